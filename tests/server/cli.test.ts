import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { main } from "../../server/cli/main";
import { expectClose } from "../helpers/expect-close";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");
const CLI = path.join(ROOT, "server/cli/thetafold.mjs");
const COPPER = path.join(ROOT, "fixtures/ingest/copper");
// The generator's truth for the SYNTHETIC copper exports (fixtures/ingest/copper/data.json "model"):
// θ_D = 343 K, γ = 0.695 mJ/(mol·K²), copper's values as recalled from Kittel, Introduction to Solid
// State Physics, 8th ed., Tables 5.1 and 6.3 (from memory).
const copperData = JSON.parse(readFileSync(path.join(COPPER, "data.json"), "utf8")) as {
  model: { thetaD: number; gamma: number };
  thermo: { temperatureK: number; entropy: string; enthalpy: string }[];
};

interface ParameterOut {
  value: number;
  stderr: number | null;
  stderrAbsolute: number | null;
  unit: string;
}

/** Runs main() in this process and captures what it writes. */
async function run(argv: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  let stdout = "";
  let stderr = "";
  const code = await main(argv, { stdout: (t) => void (stdout += t), stderr: (t) => void (stderr += t) });
  return { code, stdout, stderr };
}

/** Runs the real executable as a user would (node + the tsx shim), from another directory. */
function spawn(argv: string[]) {
  const r = spawnSync(process.execPath, [CLI, ...argv], { cwd: tmpdir(), encoding: "utf8", timeout: 60_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

describe("thetafold fit", () => {
  it("gives θ_D and γ with uncertainties from a two-column copper export in J/K (spawned executable)", () => {
    const r = spawn(["fit", path.join(COPPER, "export-j-per-k.csv"), "--formula", "Cu", "--mass-mg", "25"]);
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout) as { model: string; points: number; window: number[]; converged: boolean; parameters: Record<string, ParameterOut> };
    expect(Object.keys(out)).toEqual(expect.arrayContaining(["model", "window", "points", "parameters", "chiSquare", "reducedChiSquare", "aic", "bic", "converged"]));
    expect(out.model).toBe("electronic+debye");
    expect(out.points).toBe(120);
    expect(out.window).toEqual([1.99918, 300.014]);
    expect(out.converged).toBe(true);
    const { thetaD, gamma } = out.parameters;
    expect(thetaD.unit).toBe("K");
    expect(gamma.unit).toBe("J/(mol·K²)");
    for (const p of [thetaD, gamma]) {
      expect(p.stderr).toBeGreaterThan(0);
      expect(p.stderrAbsolute).toBeGreaterThan(0);
    }
    // Recovered within 4 standard errors of the values the data were generated with.
    expect(Math.abs(thetaD.value - copperData.model.thetaD)).toBeLessThan(4 * thetaD.stderr!);
    expect(Math.abs(gamma.value - copperData.model.gamma)).toBeLessThan(4 * gamma.stderr!);
    expect(r.stderr).toContain("equal weight");
  });

  it("fits the C/T against T² line (lowT) with σ from the µJ/K export and derives θ_D from β", async () => {
    const r = await run(["fit", path.join(COPPER, "export-uj-per-k.txt"), "--formula", "Cu", "--mass-mg", "25", "--model", "lowT", "--tmax", "8"]);
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout) as { window: number[]; parameters: Record<string, ParameterOut> };
    expect(out.window[1]).toBeLessThanOrEqual(8);
    const { gamma, beta, thetaD } = out.parameters;
    expect(beta.unit).toBe("J/(mol·K⁴)");
    expect(Math.abs(gamma.value - copperData.model.gamma)).toBeLessThan(4 * gamma.stderr!);
    // Below 8 K the Debye curve of 343 K is within 0.3 % of its T³ limit, so θ_D from β lands near 343 K.
    expect(Math.abs(thetaD.value - copperData.model.thetaD)).toBeLessThan(4 * thetaD.stderr! + 2);
  });

  it("takes the sample mass from the preamble when --mass-mg is missing, and says so", async () => {
    const r = await run(["fit", path.join(COPPER, "export-mj-per-k.csv"), "--molar-mass", "63.546", "--atoms", "1", "--fix", "nD=1"]);
    expect(r.code).toBe(0);
    expect(r.stderr).toContain("sample mass 25 mg taken from line 5");
    const out = JSON.parse(r.stdout) as { parameters: Record<string, ParameterOut & { fixed: boolean }> };
    expect(out.parameters.nD).toMatchObject({ value: 1, fixed: true, stderr: null });
  });

  it("exits 2 with a message naming the line and column of a bad cell (spawned executable)", () => {
    const dir = mkdtempSync(path.join(tmpdir(), "thetafold-cli-"));
    const lines = readFileSync(path.join(COPPER, "export-j-per-k.csv"), "utf8").split("\n");
    lines[19] = "9.99,abc";
    const bad = path.join(dir, "bad.csv");
    writeFileSync(bad, lines.join("\n"));
    const r = spawn(["fit", bad, "--formula", "Cu", "--mass-mg", "25"]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toContain("line 20, column 'Heat capacity (J/K)': 'abc' is not a number");
  });

  it("exits 2 for unknown options, unknown formula elements, a missing file and a window with too few points", async () => {
    const file = path.join(COPPER, "export-j-per-k.csv");
    const cases = [
      ["fit", file, "--formula", "Cu", "--mass-mg", "25", "--colour", "red"],
      ["fit", file, "--formula", "Qq2", "--mass-mg", "25"],
      ["fit", path.join(COPPER, "no-such-file.csv"), "--formula", "Cu"],
      ["fit", file, "--formula", "Cu", "--mass-mg", "25", "--tmin", "2", "--tmax", "2.1"],
      ["fit", file, "--formula", "Cu", "--mass-mg", "25", "--model", "debye+phonons"],
    ];
    for (const argv of cases) {
      const r = await run(argv);
      expect(r.code, argv.join(" ")).toBe(2);
      expect(r.stdout).toBe("");
      expect(r.stderr.length).toBeGreaterThan(10);
    }
    expect((await run(["fit", file, "--formula", "Qq2", "--mass-mg", "25"])).stderr).toContain("unknown element Qq");
  });

  it("asks which field to fit in a multi-field file, then fits the chosen run", async () => {
    const file = path.join(ROOT, "fixtures/ingest/clathrate-fields/fields-export.csv");
    const ask = await run(["fit", file, "--formula", "Ba8Ga16Ge30"]);
    expect(ask.code).toBe(2);
    expect(ask.stderr).toContain("choose one with --field");
    const r = await run(["fit", file, "--formula", "Ba8Ga16Ge30", "--field", "9", "--model", "electronic+debye+einstein+schottky", "--fix", "gRatio=1", "--tmax", "30"]);
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout) as { input: { fieldT: number; massMg: number } };
    expectClose(out.input.fieldT, 9, { abs: 3e-4 });
    expect(out.input.massMg).toBe(8.4);
  });
});

describe("thetafold rank", () => {
  it("orders candidate models by BIC", async () => {
    const r = await run(["rank", path.join(COPPER, "export-uj-per-k.txt"), "--formula", "Cu", "--mass-mg", "25", "--models", "debye,electronic+debye"]);
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout) as { model: string; bic: number; deltaBic: number }[];
    expect(out.map((o) => o.model).sort()).toEqual(["debye", "electronic+debye"]);
    expect(out[0].bic).toBeLessThanOrEqual(out[1].bic);
    expect(out[0].deltaBic).toBe(0);
    expect(r.stderr).toContain("fitting 2/2");
  });
});

describe("thetafold tabulate", () => {
  // Reference: fixtures/physics/debye/data.json and fixtures/physics/einstein/data.json, mpmath 1.3.0 at 40 digits.
  const debye = JSON.parse(readFileSync(path.join(ROOT, "fixtures/physics/debye/data.json"), "utf8")) as { data: { x: number; d3: number; d2: number }[] };

  it("prints C/(3nR) of the Debye function at the given x, matching mpmath to rel 1e-13", async () => {
    const rows = [debye.data[3], debye.data[20], debye.data[debye.data.length - 5]];
    const r = await run(["tabulate", "debye", "--x", rows.map((d) => String(d.x)).join(",")]);
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout) as { x: number; value: number }[];
    out.forEach((o, i) => {
      expect(o.x).toBe(rows[i].x);
      expectClose(o.value, rows[i].d3, { rel: 1e-13 }, `D3(${o.x})`);
    });
    const two = JSON.parse((await run(["tabulate", "debye", "--x", String(rows[1].x), "--dimension", "2"])).stdout) as { value: number }[];
    expectClose(two[0].value, rows[1].d2, { rel: 1e-13 });
  });

  it("prints the Einstein function: E(0) = 1 and E(1) = e/(e − 1)² (definition)", async () => {
    const out = JSON.parse((await run(["tabulate", "einstein", "--x", "0,1"])).stdout) as { value: number }[];
    expect(out[0].value).toBe(1);
    expectClose(out[1].value, Math.E / (Math.E - 1) ** 2, { rel: 1e-15 });
  });

  it("exits 2 for a negative x or an unknown function", async () => {
    expect((await run(["tabulate", "debye", "--x", "-1"])).code).toBe(2);
    expect((await run(["tabulate", "planck", "--x", "1"])).code).toBe(2);
  });
});

describe("thetafold thermo", () => {
  it("gives S and H − H(0) within 0.3 % of the generator's noise-free values (mpmath 1.3.0)", async () => {
    const ref = copperData.thermo.filter((t) => [50, 100, 298.15].includes(t.temperatureK));
    const r = await run(["thermo", path.join(COPPER, "export-uj-per-k.txt"), "--formula", "Cu", "--mass-mg", "25", "--at", ref.map((t) => t.temperatureK).join(",")]);
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout) as { rows: { T: number; S: number; H: number }[] };
    // The data carry 0.2 % scatter; integrals average it down, so 0.3 % bounds the difference.
    out.rows.forEach((row, i) => {
      expect(row.T).toBe(ref[i].temperatureK);
      expectClose(row.S, Number(ref[i].entropy), { rel: 3e-3 }, `S(${row.T})`);
      expectClose(row.H, Number(ref[i].enthalpy), { rel: 3e-3 }, `H(${row.T})`);
    });
  });

  it("exits 2 for a temperature above the data", async () => {
    const r = await run(["thermo", path.join(COPPER, "export-uj-per-k.txt"), "--formula", "Cu", "--mass-mg", "25", "--at", "400"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain("400");
  });
});

describe("thetafold", () => {
  it("prints its usage with --help and exits 2 for an unknown command", async () => {
    const help = await run(["--help"]);
    expect(help.code).toBe(0);
    expect(help.stdout).toContain("verify-bundle");
    expect((await run(["frobnicate"])).code).toBe(2);
    expect((await run([])).code).toBe(2);
  });
});

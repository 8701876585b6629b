/*
 * `npm run bench` (node --import tsx tests/bench/run.ts [name-filter …]): prints speed figures, asserts
 * nothing. Each section is one entry of `sections` below: a name, a title and a function returning
 * the lines to print; to add a figure, add a section. Timings are medians of repeated runs after
 * warm-up, on whatever else the machine is doing (the load average is printed with them).
 * All data here are synthetic (seeded), never measurements.
 */
import { loadavg, cpus } from "node:os";
import { debyeFunction } from "@shared/physics/debye";
import { buildComposite } from "@shared/physics/composite";
import type { ModelDefinition } from "@shared/physics/model-types";
import { fitHeatCapacity } from "@shared/fitting/fit-model";
import { fitLeastSquares } from "@shared/fitting/least-squares";
import { createSeededRandom } from "@shared/numerics/seeded-random";
import { scaleSection } from "./scale";

export interface BenchLine {
  label: string;
  value: number;
  unit: string;
  /** The target from the issue, in words, when there is one. */
  goal?: string;
  /** Extra context: spread, iterations, … */
  note?: string;
}

export interface BenchSection {
  /** Short id used to select sections on the command line. */
  name: string;
  title: string;
  run: () => BenchLine[];
}

interface Timing {
  medianMs: number;
  minMs: number;
  maxMs: number;
  /** Median CPU time (user + system) of this process per run: less sensitive than wall time to other load. */
  cpuMedianMs: number;
}

/** Median wall time (and CPU time) of fn over `repeats` runs after `warmup` unmeasured runs. */
export function measure(fn: () => unknown, { warmup = 10, repeats = 31 }: { warmup?: number; repeats?: number } = {}): Timing {
  let sink = 0;
  for (let i = 0; i < warmup; i++) sink += Number(Boolean(fn()));
  const times: number[] = [];
  const cpu: number[] = [];
  for (let i = 0; i < repeats; i++) {
    const cpuStart = process.cpuUsage();
    const start = performance.now();
    sink += Number(Boolean(fn()));
    times.push(performance.now() - start);
    const used = process.cpuUsage(cpuStart);
    cpu.push((used.user + used.system) / 1000);
  }
  if (sink < 0) console.log(sink); // keeps the results alive
  times.sort((a, b) => a - b);
  cpu.sort((a, b) => a - b);
  const mid = Math.floor(times.length / 2);
  return { medianMs: times[mid], minMs: times[0], maxMs: times[times.length - 1], cpuMedianMs: cpu[mid] };
}

const spread = (t: Timing) =>
  `min ${t.minMs.toFixed(2)} ms, max ${t.maxMs.toFixed(2)} ms, CPU-time median ${t.cpuMedianMs.toFixed(2)} ms`;

/** A synthetic run of `def` on a log-spaced grid with relative Gaussian noise. */
function syntheticRun(def: ModelDefinition, atoms: number, params: number[], points: number, tMinK: number, tMaxK: number, seed: number) {
  const model = buildComposite(def, atoms);
  const random = createSeededRandom(seed);
  const temperatureK = Array.from({ length: points }, (_, i) => tMinK * (tMaxK / tMinK) ** (i / (points - 1)));
  const exact = temperatureK.map((t) => model.evaluate(params, t));
  const sigma = exact.map((c) => 0.005 * c);
  const cp = exact.map((c, i) => c + sigma[i] * random.normal());
  return { model, data: { temperatureK, cp, sigma } };
}

function fitSection(
  name: string,
  title: string,
  def: ModelDefinition,
  atoms: number,
  truth: number[],
  points: number,
  goalMs: number,
): BenchSection {
  return {
    name,
    title,
    run: () => {
      const { model, data } = syntheticRun(def, atoms, truth, points, 2, 300, 42);
      const opts = { atomsPerFormulaUnit: atoms };
      const full = fitHeatCapacity(data, def, opts);
      const fullTiming = measure(() => fitHeatCapacity(data, def, opts));
      // The least-squares core alone, from the same start the automatic start values chose.
      const core = () =>
        fitLeastSquares({ x: data.temperatureK, y: data.cp, sigma: data.sigma }, model.evaluate, {
          initialValues: full.startValues,
          lowerBounds: model.params.map((p) => p.lower),
          upperBounds: model.params.map((p) => p.upper),
          jacobianFunction: model.jacobian,
        });
      const coreFit = core();
      const coreTiming = measure(core);
      const evalTiming = measure(() => {
        let s = 0;
        for (const t of data.temperatureK) s += model.evaluate(truth, t);
        return s;
      });
      const jacobian = model.jacobian;
      if (jacobian === undefined) throw new Error(`${name}: the composite model has no analytic Jacobian`);
      const jacTiming = measure(() => {
        let s = 0;
        for (const t of data.temperatureK) s += jacobian(truth, t)[0];
        return s;
      });
      return [
        {
          label: "fitHeatCapacity: start values, fit, covariance",
          value: fullTiming.medianMs,
          unit: "ms",
          goal: `< ${goalMs} ms`,
          note: `${spread(fullTiming)}; ${full.startsTried} start(s), ${full.iterations} iterations, converged ${full.converged}, χ²_red ${full.reducedChiSquare.toFixed(3)}`,
        },
        {
          label: "fitLeastSquares alone from the chosen start (with covariance)",
          value: coreTiming.medianMs,
          unit: "ms",
          note: `${spread(coreTiming)}; ${coreFit.iterations} iterations`,
        },
        { label: `one pass of model.evaluate over the ${points} points`, value: evalTiming.medianMs, unit: "ms" },
        { label: `one pass of model.jacobian over the ${points} points`, value: jacTiming.medianMs, unit: "ms" },
      ];
    },
  };
}

export const sections: BenchSection[] = [
  {
    name: "debye",
    title: "Debye function D₃(x), x log-uniform in [0.01, 100]",
    run: () => {
      const random = createSeededRandom(7);
      const xs = Float64Array.from({ length: 100_000 }, () => 0.01 * 10_000 ** random.uniform());
      const passes = 10;
      const timing = measure(
        () => {
          let s = 0;
          for (let p = 0; p < passes; p++) for (let i = 0; i < xs.length; i++) s += debyeFunction(xs[i]);
          return s;
        },
        { warmup: 3, repeats: 11 },
      );
      const perCall = (timing.medianMs * 1e6) / (passes * xs.length);
      return [
        {
          label: "debyeFunction(x) per evaluation",
          value: perCall,
          unit: "ns",
          goal: "no slower than a compiled library (about 90 ns)",
          note: `${passes * xs.length} evaluations per run; ${spread(timing)}`,
        },
      ];
    },
  },
  fitSection(
    "fit-debye-2000",
    "Weighted γT + Debye fit, 2,000 points 2–300 K, 0.5 % noise (synthetic)",
    { components: [{ kind: "electronic" }, { kind: "debye" }] },
    2,
    [1.2e-3, 320, 2],
    2000,
    6,
  ),
  fitSection(
    "fit-three-500",
    "Weighted γT + Debye + Einstein fit, 500 points 2–300 K, 0.5 % noise (synthetic)",
    { components: [{ kind: "electronic" }, { kind: "debye" }, { kind: "einstein" }] },
    5,
    [2e-3, 250, 3, 80, 2],
    500,
    5,
  ),
  scaleSection,
];

function main(): void {
  const filters = process.argv.slice(2);
  const chosen = filters.length === 0 ? sections : sections.filter((s) => filters.some((f) => s.name.includes(f)));
  if (chosen.length === 0) {
    console.error(`no bench section matches ${filters.join(" ")}; sections: ${sections.map((s) => s.name).join(", ")}`);
    process.exitCode = 2;
    return;
  }
  const load = loadavg().map((v) => v.toFixed(2)).join(" ");
  const cpuList = cpus();
  console.log(`Thetafold bench: node ${process.version}, ${cpuList.length} CPU(s) (${cpuList[0]?.model ?? "unknown"}), load average ${load}`);
  for (const section of chosen) {
    console.log(`\n[${section.name}] ${section.title}`);
    for (const line of section.run()) {
      const value = line.value >= 100 ? line.value.toFixed(0) : line.value.toPrecision(3);
      console.log(`  ${line.label}: ${value} ${line.unit}${line.goal ? `   (goal ${line.goal})` : ""}`);
      if (line.note) console.log(`      ${line.note}`);
    }
  }
}

main();

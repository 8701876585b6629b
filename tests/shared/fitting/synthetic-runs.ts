/*
 * Synthetic heat-capacity runs for the fitter tests (invented data, labelled synthetic): a composite
 * model evaluated on a log-spaced temperature grid, with Gaussian noise of a fixed relative size drawn
 * from a seeded generator passed in by the test.
 */
import { buildComposite } from "@shared/physics/composite";
import type { ModelDefinition } from "@shared/physics/model-types";
import type { SeededRandom } from "@shared/numerics/seeded-random";

export interface SyntheticRun {
  temperatureK: number[];
  cp: number[];
  sigma: number[];
  /** The noise-free curve. */
  exact: number[];
}

export function syntheticRun(
  def: ModelDefinition,
  atoms: number,
  params: number[],
  grid: { points: number; tMinK: number; tMaxK: number },
  relativeNoise: number,
  random: SeededRandom,
): SyntheticRun {
  const model = buildComposite(def, atoms);
  const temperatureK = Array.from(
    { length: grid.points },
    (_, i) => grid.tMinK * (grid.tMaxK / grid.tMinK) ** (i / (grid.points - 1)),
  );
  const exact = temperatureK.map((t) => model.evaluate(params, t));
  const sigma = exact.map((c) => relativeNoise * c);
  const cp = exact.map((c, i) => c + sigma[i] * random.normal());
  return { temperatureK, cp, sigma, exact };
}

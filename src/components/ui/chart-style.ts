/*
 * The look shared by every recharts chart: grid, axis line and tick text, and axis titles, all drawn
 * from the theme tokens in src/index.css so both themes follow. Spread them into the recharts elements:
 * <CartesianGrid {...CHART_GRID} />, <XAxis {...CHART_AXIS} label={xAxisTitle("T (K)")} />.
 */

/** Dashed grid lines in the line colour. */
export const CHART_GRID = { stroke: "var(--color-line)", strokeDasharray: "2 4" } as const;

/** Axis line and tick labels; the import preview uses the smaller size 11. */
export function chartAxis(fontSize = 12) {
  return { stroke: "var(--color-line-strong)", tick: { fill: "var(--color-ink-muted)", fontSize } } as const;
}

/** Axis line and tick labels at the usual size. */
export const CHART_AXIS = chartAxis();

/** Title under the x axis. */
export function xAxisTitle(value: string, { offset = -4, fontSize = 12 }: { offset?: number; fontSize?: number } = {}) {
  return { value, position: "insideBottom", offset, fill: "var(--color-ink-muted)", fontSize } as const;
}

/** Title beside the y axis, turned to read upwards. */
export function yAxisTitle(value: string, { fontSize = 12 }: { fontSize?: number } = {}) {
  return { value, angle: -90, position: "insideLeft", offset: 10, fill: "var(--color-ink-muted)", fontSize, style: { textAnchor: "middle" } } as const;
}

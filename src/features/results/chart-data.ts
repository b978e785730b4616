import { modifiedArrheniusRate } from "@shared/science/rates/arrhenius-fit";
import type { ChartPlan } from "./chart-plan";

export type DrawnSeries = { name: string; bold: boolean; dashed: boolean };

/** uPlot's data layout: one shared x array, then one y array per series (null where a series has no point). */
export type AlignedData = {
  data: [number[], ...(number | null)[][]];
  series: DrawnSeries[];
  /** Whether the series were sampled on different x values (lines then span the gaps between them). */
  gridsDiffer: boolean;
};

/**
 * Puts a plan's series on one x axis (the sorted union of their x values) and adds, for each series with
 * a modified-Arrhenius fit, the fitted k(T) = α (T/300 K)^β exp(−γ/T) at the series' temperatures inside
 * the fitted range, as a dashed series after it.
 */
export function alignSeries(plan: ChartPlan): AlignedData {
  const xs = [...new Set(plan.series.flatMap((s) => s.x))].sort((a, b) => a - b);
  const index = new Map(xs.map((x, i) => [x, i]));
  const columns: (number | null)[][] = [];
  const series: DrawnSeries[] = [];
  const firstGrid = plan.series[0]?.x.join(",");
  for (const s of plan.series) {
    const column: (number | null)[] = new Array(xs.length).fill(null);
    s.x.forEach((x, i) => {
      column[index.get(x)!] = s.y[i]!;
    });
    columns.push(column);
    series.push({ name: s.name, bold: s.bold, dashed: false });
    if (s.fit) {
      const fit = s.fit;
      const parameters = { alpha: fit.alpha_cm3_per_s, beta: fit.beta, gamma: fit.gamma_K };
      const fitted: (number | null)[] = new Array(xs.length).fill(null);
      for (const x of s.x) {
        if (x < fit.minTemperatureK || x > fit.maxTemperatureK) continue;
        const k = modifiedArrheniusRate(x, parameters);
        fitted[index.get(x)!] = Number.isFinite(k) && (!plan.logY || k > 0) ? k : null;
      }
      columns.push(fitted);
      const name = plan.series.length === 1 ? "Arrhenius fit" : `${s.name}: Arrhenius fit`;
      series.push({ name, bold: false, dashed: true });
    }
  }
  return {
    data: [xs, ...columns],
    series,
    gridsDiffer: plan.series.some((s) => s.x.join(",") !== firstGrid),
  };
}

/** Past this many decades a logarithmic axis is marked at powers of ten only. */
const DECADES_WITH_INTERMEDIATE_MARKS = 8;

/**
 * Where a logarithmic axis between `min` and `max` (> 0) may put a mark: 1, 2, … 9 × 10ⁿ written exactly
 * (the chart thins the labels to those that fit), over any range a double can hold, in at most a few
 * hundred marks. uPlot's own marks stop short of 10⁻²⁵ and, below it, loop until the page runs out of
 * memory, so every logarithmic axis takes its marks from here.
 */
export function logAxisSplits(min: number, max: number): number[] {
  if (!(min > 0) || !(max >= min) || !Number.isFinite(max)) return [];
  const first = Math.floor(Math.log10(min));
  const last = Math.ceil(Math.log10(max));
  const multiples = last - first > DECADES_WITH_INTERMEDIATE_MARKS ? [1] : [1, 2, 3, 4, 5, 6, 7, 8, 9];
  const splits: number[] = [];
  for (let exponent = first; exponent <= last; exponent++) {
    for (const multiple of multiples) {
      const value = Number(`${multiple}e${exponent}`);
      // Within rounding of the range's ends (powers of ten as the chart library computes them).
      if (value >= min * (1 - 1e-9) && value <= max * (1 + 1e-9)) splits.push(value);
    }
  }
  return splits;
}

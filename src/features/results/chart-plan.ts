import type { ArrheniusFitResult, Result, ResultKind, ResultProcess } from "@shared/schemas";
import { columnLabel, resultTitle } from "./result-labels";

/** The results of one kind for one process: drawn on one chart, the whole (sum, total) in bold. */
export type ResultGroup = {
  key: string;
  kind: ResultKind;
  process: ResultProcess;
  title: string;
  /** The whole first (a sum over irreps, a total over orbitals), then its parts in the API's order. */
  rows: Result[];
};

const KIND_ORDER: readonly ResultKind[] = [
  "cross-section",
  "eigenphase-sum",
  "rate-coefficient",
  "orbital-table",
  "target-properties",
];

const isWhole = (result: Result) => result.irrep === null && result.label === "";

/** Results grouped by kind and process, cross sections first, rates after eigenphase sums. */
export function groupResults(results: readonly Result[]): ResultGroup[] {
  const groups = new Map<string, ResultGroup>();
  for (const result of results) {
    const key = `${result.kind}/${result.process}`;
    let group = groups.get(key);
    if (!group) {
      group = {
        key,
        kind: result.kind,
        process: result.process,
        title: resultTitle(result.kind, result.process),
        rows: [],
      };
      groups.set(key, group);
    }
    group.rows.push(result);
  }
  return [...groups.values()]
    .map((group) => ({
      ...group,
      rows: [...group.rows.filter(isWhole), ...group.rows.filter((r) => !isWhole(r))],
    }))
    .sort((a, b) => KIND_ORDER.indexOf(a.kind) - KIND_ORDER.indexOf(b.kind));
}

/** How one result row is named in a legend or table caption. */
export function partName(result: Result, group: ResultGroup): string {
  // An orbital's label ("1b1") already names its irrep.
  if (!isWhole(result)) return result.label || result.irrep || "";
  if (group.rows.length === 1) return columnLabel(result.columnOrder[1] ?? "").quantity || group.title;
  return group.rows.some((row) => row.label === "" && row.irrep !== null) ? "Sum over irreps" : "Total";
}

/**
 * The one method line shown with a group's chart: its whole's (sum over irreps, total over orbitals) when
 * it has one, else the method its parts share; null when the parts were derived differently.
 */
export function groupMethod(group: ResultGroup): string | null {
  const whole = group.rows.find(isWhole);
  if (whole) return whole.method;
  const methods = new Set(group.rows.map((row) => row.method));
  return methods.size === 1 ? group.rows[0]!.method : null;
}

/** The parts whose method says more than the group's line (BEB per orbital: its B, U, N), by name. */
export function seriesMethods(group: ResultGroup): { id: string; name: string; method: string }[] {
  const shown = groupMethod(group);
  return group.rows
    .filter((row) => row.method !== shown)
    .map((row) => ({ id: row.id, name: partName(row, group), method: row.method }));
}

export type ChartSeries = {
  name: string;
  /** The whole (sum or total) is drawn bold over its parts. */
  bold: boolean;
  x: number[];
  y: number[];
  fit: ArrheniusFitResult | null;
};

export type ChartPlan = {
  title: string;
  xLabel: string;
  yLabel: string;
  logX: boolean;
  logY: boolean;
  series: ChartSeries[];
  /** Points not drawn: not finite, or at or below zero on a logarithmic axis. The table keeps them. */
  leftOut: number;
  /**
   * The y range of a logarithmic y axis, whole powers of ten: from the decade above the largest value
   * down at most LOG_Y_DECADES decades. Null on a linear axis (the chart library fits it to the data).
   */
  yRange: [min: number, max: number] | null;
  /** Drawn values below `yRange` (the curve leaves the chart at its lower edge there). */
  belowRange: number;
};

/**
 * How many decades a logarithmic y axis spans at most. A rate coefficient near an ionization threshold
 * falls to 10⁻⁸⁰ cm³ s⁻¹ and below at low temperature; drawn to scale, the decades that matter would
 * shrink to a sliver at the top of the chart.
 */
export const LOG_Y_DECADES = 12;

/** 10^exponent exactly as written ("1e-8"), which `10 ** -8` is not for every exponent. */
export const powerOfTen = (exponent: number) => Number(`1e${exponent}`);

/** The decade-aligned window of a logarithmic y axis over positive values; null when there are none. */
export function logYRange(values: readonly number[]): [number, number] | null {
  let min = Number.POSITIVE_INFINITY;
  let max = 0;
  for (const value of values) {
    if (!(value > 0) || !Number.isFinite(value)) continue;
    if (value < min) min = value;
    if (value > max) max = value;
  }
  if (max === 0) return null;
  const top = Math.ceil(Math.log10(max));
  const bottom = Math.max(Math.floor(Math.log10(min)), top - LOG_Y_DECADES);
  return [powerOfTen(Math.min(bottom, top - 1)), powerOfTen(top)];
}

/** Axes per kind: σ(E) and k(T) span decades (log–log); eigenphase sums are angles (linear). */
const AXES: Record<ResultKind, { logX: boolean; logY: boolean } | null> = {
  "cross-section": { logX: true, logY: true },
  "eigenphase-sum": { logX: false, logY: false },
  "rate-coefficient": { logX: true, logY: true },
  "orbital-table": null,
  "target-properties": null,
};

/**
 * What a group's chart draws: the first column against the second of each row. Points a logarithmic
 * axis cannot show (zero, negative) and non-finite values are left out and counted, so the chart never
 * receives a value it cannot place and the page can say how many are missing. Null when the group is
 * not drawn (orbital tables) or has no row with two columns.
 */
export function chartPlan(group: ResultGroup): ChartPlan | null {
  const axes = AXES[group.kind];
  const drawable = group.rows.filter((row) => row.columnOrder.length >= 2);
  const first = drawable[0];
  if (!axes || !first) return null;
  let leftOut = 0;
  const series = drawable.map((row): ChartSeries => {
    const xs = row.columns[row.columnOrder[0]!] ?? [];
    const ys = row.columns[row.columnOrder[1]!] ?? [];
    const x: number[] = [];
    const y: number[] = [];
    const count = Math.min(xs.length, ys.length);
    for (let i = 0; i < count; i++) {
      const xi = xs[i]!;
      const yi = ys[i]!;
      const placeable =
        Number.isFinite(xi) && Number.isFinite(yi) && (!axes.logX || xi > 0) && (!axes.logY || yi > 0);
      if (placeable) {
        x.push(xi);
        y.push(yi);
      } else {
        leftOut++;
      }
    }
    return { name: partName(row, group), bold: isWhole(row) && drawable.length > 1, x, y, fit: row.fit };
  });
  const yRange = axes.logY ? logYRange(series.flatMap((s) => s.y)) : null;
  const belowRange = yRange ? series.reduce((n, s) => n + s.y.filter((y) => y < yRange[0]).length, 0) : 0;
  return {
    title: group.title,
    xLabel: columnLabel(first.columnOrder[0]!).text,
    yLabel: columnLabel(first.columnOrder[1]!).text,
    ...axes,
    series,
    leftOut,
    yRange,
    belowRange,
  };
}

// Loaded on demand (lazy-result-chart.tsx): uPlot and its style sheet stay out of the main bundle.
import { useEffect, useRef } from "react";
import uPlot from "uplot";
import "uplot/dist/uPlot.min.css";
import { alignSeries, logAxisSplits } from "../chart-data";
import type { ChartPlan } from "../chart-plan";
import { formatSignificant } from "../format-number";

/** Line colours in legend order (ink and flux shades of the palette, then contrasting hues). */
const COLOURS = ["#17203a", "#0d8a77", "#d9530c", "#48639a", "#38c7ac", "#b43d0d", "#6a84b5", "#114841"];
const HEIGHT_PX = 280;

const tickValues = (_: uPlot, splits: number[]) =>
  splits.map((value) => (value === null || value === undefined ? "" : formatSignificant(value, 3)));

/** Marks of a logarithmic axis from Sigmaflow's own rule, which holds over any range (see logAxisSplits). */
const logSplits = (_: uPlot, _axis: number, min: number, max: number) => logAxisSplits(min, max);

function chartOptions(plan: ChartPlan, widthPx: number): { options: uPlot.Options; data: uPlot.AlignedData } {
  const aligned = alignSeries(plan);
  let colour = 0;
  const series: uPlot.Series[] = [
    { label: plan.xLabel, value: (_, v) => (v === null ? "—" : formatSignificant(v)) },
    ...aligned.series.map((s): uPlot.Series => {
      // A fit takes the colour of the series it fits.
      const stroke = COLOURS[(s.dashed ? colour - 1 : colour++) % COLOURS.length];
      return {
        label: s.name,
        stroke,
        width: s.bold ? 2.5 : 1.25,
        dash: s.dashed ? [6, 4] : undefined,
        spanGaps: s.dashed || aligned.gridsDiffer,
        points: { show: false },
        value: (_, v) => (v === null ? "—" : formatSignificant(v)),
      };
    }),
  ];
  return {
    options: {
      width: widthPx,
      height: HEIGHT_PX,
      scales: {
        x: { time: false, distr: plan.logX ? 3 : 1 },
        y: plan.yRange ? { distr: 3, range: [plan.yRange[0], plan.yRange[1]] } : { distr: plan.logY ? 3 : 1 },
      },
      axes: [
        { label: plan.xLabel, values: tickValues, splits: plan.logX ? logSplits : undefined },
        { label: plan.yLabel, values: tickValues, size: 80, splits: plan.logY ? logSplits : undefined },
      ],
      series,
      cursor: { drag: { x: true, y: false } },
    },
    data: aligned.data as uPlot.AlignedData,
  };
}

/** One result group drawn with uPlot, sized to its container's width. */
export default function ResultChart({ plan }: { plan: ChartPlan }) {
  const containerRef = useRef<HTMLDivElement>(null);
  useEffect(() => {
    const container = containerRef.current;
    if (!container) return;
    const widthPx = () => Math.max(280, Math.floor(container.clientWidth));
    const { options, data } = chartOptions(plan, widthPx());
    const chart = new uPlot(options, data, container);
    const observer = new ResizeObserver(() => chart.setSize({ width: widthPx(), height: HEIGHT_PX }));
    observer.observe(container);
    return () => {
      observer.disconnect();
      chart.destroy();
    };
  }, [plan]);
  return <div ref={containerRef} className="w-full" />;
}

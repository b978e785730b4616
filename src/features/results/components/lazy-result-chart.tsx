import { Component, lazy, type ReactNode, Suspense } from "react";
import { Skeleton } from "@/components/ui/skeleton";
import type { ChartPlan } from "../chart-plan";

// The charting library is fetched the first time a chart is shown, not with the rest of the page.
const ResultChart = lazy(() => import("./result-chart"));

/** A chart that cannot load or draw leaves the rest of the results (and the table below it) in place. */
class ChartBoundary extends Component<{ children: ReactNode }, { failed: boolean }> {
  override state = { failed: false };
  static getDerivedStateFromError() {
    return { failed: true };
  }
  override render() {
    if (this.state.failed) {
      return (
        <p className="rounded-lg border border-ink-100 bg-ink-50 px-4 py-3 text-sm text-ink-700">
          The chart could not be drawn; the numbers are in the table below.
        </p>
      );
    }
    return this.props.children;
  }
}

/** A result group's chart, with a placeholder of the same height while the chart module loads. */
export function LazyResultChart({ plan }: { plan: ChartPlan }) {
  return (
    <figure aria-label={`Chart: ${plan.title}, ${plan.yLabel} against ${plan.xLabel}`} className="m-0">
      <ChartBoundary>
        <Suspense
          fallback={
            <div role="status" aria-label="Loading the chart" className="relative h-[280px]">
              <Skeleton className="absolute inset-0" />
            </div>
          }
        >
          <ResultChart plan={plan} />
        </Suspense>
      </ChartBoundary>
    </figure>
  );
}

/**
 * The real chart module (uPlot) drawing results shaped like a demo water run's, on a canvas that
 * records what is written on it (jsdom has no 2D canvas). What matters here is that every chart is drawn
 * at all, in bounded time, and which axis labels it writes: a rate coefficient that falls to 10⁻⁷⁷
 * cm³ s⁻¹ must neither stall the page nor squeeze the decades that matter into a sliver.
 */
import { render } from "@testing-library/react";
import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import { chartPlan, groupResults } from "@/features/results/chart-plan";
import ResultChart from "@/features/results/components/result-chart";
import { waterShapedResults } from "./support/result-fixtures";

// uPlot reads the device pixel ratio through matchMedia when its module loads and builds its lines as
// Path2D objects; jsdom has neither.
vi.hoisted(() => {
  globalThis.Path2D ??= class {
    moveTo() {}
    lineTo() {}
    rect() {}
    arc() {}
    bezierCurveTo() {}
    quadraticCurveTo() {}
    closePath() {}
    addPath() {}
  } as unknown as typeof Path2D;
  window.matchMedia ??= (query: string) =>
    ({
      matches: false,
      media: query,
      addListener: () => {},
      removeListener: () => {},
      addEventListener: () => {},
      removeEventListener: () => {},
    }) as unknown as MediaQueryList;
});

/** Text written on canvases since the test began, in order. */
let written: string[] = [];

/** A 2D context that accepts every call and keeps the text written with fillText. */
function recordingContext(): CanvasRenderingContext2D {
  const target: Record<string, unknown> = {
    fillText: (text: string) => {
      written.push(text);
    },
    measureText: (text: string) => ({ width: text.length * 6 }),
    getLineDash: () => [],
    canvas: null,
  };
  return new Proxy(target, {
    get: (object, key: string) => (key in object ? object[key] : () => undefined),
    set: (object, key: string, value) => {
      object[key] = value;
      return true;
    },
  }) as unknown as CanvasRenderingContext2D;
}

beforeEach(() => {
  written = [];
  vi.spyOn(HTMLCanvasElement.prototype, "getContext").mockImplementation(
    recordingContext as unknown as HTMLCanvasElement["getContext"],
  );
  vi.stubGlobal(
    "ResizeObserver",
    class {
      observe() {}
      disconnect() {}
    },
  );
});
afterEach(() => {
  vi.restoreAllMocks();
  vi.unstubAllGlobals();
});

/** uPlot draws in a microtask after it is created. */
const drawn = () => new Promise((resolve) => setTimeout(resolve, 0));

const planFor = (title: string) => {
  const group = groupResults(waterShapedResults().results).find((candidate) => candidate.title === title);
  return chartPlan(group!)!;
};

describe("drawing results shaped like a real run's", () => {
  it("draws the ionization rates, from 10⁻⁷⁷ to 10⁻⁸ cm³ s⁻¹, on twelve decades in well under a second", async () => {
    const plan = planFor("Ionization rate coefficient");
    const started = performance.now();
    render(<ResultChart plan={plan} />);
    await drawn();
    expect(performance.now() - started).toBeLessThan(1000);
    // The axis ends at the decade above the largest rate and spans twelve decades below it.
    expect(plan.yRange).toEqual([1e-20, 1e-8]);
    expect(written).toContain("1 × 10⁻⁸");
    expect(written).toContain("1 × 10⁻²⁰");
    const powers = written.flatMap((text) => {
      const match = /^1 × 10([⁻⁰¹²³⁴⁵⁶⁷⁸⁹]+)$/.exec(text);
      return match ? [match[1]!] : [];
    });
    // No mark below the window; the rates there lie under the lower edge.
    expect(powers).not.toContain("⁻²¹");
    expect(powers).not.toContain("⁻⁷⁷");
    expect(plan.belowRange).toBeGreaterThan(0);
  });

  it("draws every chart of the run", async () => {
    const groups = groupResults(waterShapedResults().results);
    const plans = groups.flatMap((group) => {
      const plan = chartPlan(group);
      return plan ? [plan] : [];
    });
    expect(plans.map((plan) => plan.title)).toEqual([
      "Elastic cross section",
      "Ionization cross section",
      "Eigenphase sums",
      "Elastic rate coefficient",
      "Momentum-transfer rate coefficient",
      "Ionization rate coefficient",
    ]);
    for (const plan of plans) {
      written = [];
      const { container, unmount } = render(<ResultChart plan={plan} />);
      await drawn();
      expect(container.querySelector("canvas"), plan.title).not.toBeNull();
      // Axis titles are written on the canvas with the marks.
      expect(written, plan.title).toContain(plan.yLabel);
      unmount();
    }
  });
});

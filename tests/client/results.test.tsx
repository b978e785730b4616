/**
 * The results section of a finished run's page against the fake API (shared/schemas/results.ts is the
 * contract): the state of deriving results, the caution, each kind of result with its method line, its
 * chart (loaded on demand) and its numbers with units.
 */
import { RESULTS_CAUTION, type RunResults } from "@shared/schemas";
import { screen, waitFor, within } from "@testing-library/react";
import { HttpResponse, http } from "msw";
import { describe, expect, it, vi } from "vitest";
import type { ChartPlan } from "@/features/results/chart-plan";
import { installFakeApi } from "./support/fake-api";
import { KESTREL_ID, kestrel, people } from "./support/fixtures";
import { renderApp } from "./support/render-app";
import { derivedResults, ionizationResults, waterShapedResults } from "./support/result-fixtures";
import { kestrelRuns, RUN_IDS } from "./support/run-fixtures";
import { server } from "./support/server";

// The chart module (uPlot on a canvas, which jsdom cannot draw) is replaced by a list of what it would
// draw. Its import waits for `releaseChart`, so the placeholder shown while it loads can be seen.
const chartModule = vi.hoisted(() => {
  let release: () => void = () => {};
  const loaded = new Promise<void>((resolve) => {
    release = resolve;
  });
  return { loaded, release: () => release() };
});
vi.mock("@/features/results/components/result-chart", async () => {
  await chartModule.loaded;
  return {
    default: ({ plan }: { plan: ChartPlan }) => (
      <p data-testid="result-chart">
        {plan.yLabel} vs {plan.xLabel}
        {plan.logX && plan.logY ? ", log–log" : ""}:{" "}
        {plan.series.map((s) => `${s.name}${s.bold ? " (bold)" : ""}`).join(", ")}
      </p>
    ),
  };
});

const runPath = `/groups/${KESTREL_ID}/runs/${RUN_IDS.done}`;

function serveResults(answers: RunResults[]) {
  let calls = 0;
  server.use(
    http.get("/api/runs/:runId/results", () => {
      const answer = answers[Math.min(calls, answers.length - 1)]!;
      calls++;
      return HttpResponse.json(answer);
    }),
  );
  return { calls: () => calls };
}

function install() {
  installFakeApi({
    me: people.tomas,
    groups: [{ ...kestrel, myRole: "member" }],
    runs: { [KESTREL_ID]: kestrelRuns() },
  });
}

describe("results of a finished run", () => {
  it("loads the chart module only when a chart is shown, with a placeholder meanwhile", async () => {
    install();
    serveResults([derivedResults()]);
    renderApp(runPath);
    expect(await screen.findByRole("heading", { name: "Elastic cross section" })).toBeInTheDocument();
    // One chart per kind: the cross sections (three irreps' series on one) and the rate coefficient.
    expect(screen.getAllByRole("status", { name: "Loading the chart" })).toHaveLength(2);
    expect(screen.queryByTestId("result-chart")).not.toBeInTheDocument();

    chartModule.release();
    const charts = await screen.findAllByTestId("result-chart");
    expect(charts.map((chart) => chart.textContent)).toEqual([
      "σ (Å²) vs Energy (eV), log–log: Sum over irreps (bold), A1, B2",
      "k (cm³ s⁻¹) vs Temperature (K), log–log: k",
    ]);
    expect(screen.queryByRole("status", { name: "Loading the chart" })).not.toBeInTheDocument();
  });

  it("shows the caution once, each method line, the fit and the numbers with units", async () => {
    install();
    serveResults([derivedResults()]);
    const { user } = renderApp(runPath);
    await screen.findByRole("heading", { name: "Elastic cross section" });
    expect(screen.getAllByText(RESULTS_CAUTION)).toHaveLength(1);
    // Both groups were derived by the demo solver, and say so.
    expect(screen.getAllByText(/a teaching-grade model, not a production calculation/)).toHaveLength(2);

    // The B2 cross section ends in 0, which the log–log chart leaves out and the table keeps.
    expect(
      screen.getByText(/1 value is not drawn: zero, negative or not finite, which a logarithmic axis/),
    ).toBeInTheDocument();
    // A group's tables are put on the page only once its numbers are opened.
    expect(screen.queryByRole("table", { name: "Elastic cross section: B2" })).not.toBeInTheDocument();
    await user.click(screen.getByText("Numbers (3 tables)"));
    const b2 = await screen.findByRole("table", { name: "Elastic cross section: B2" });
    expect(within(b2).getByRole("columnheader", { name: "Energy (eV)" })).toBeInTheDocument();
    expect(within(b2).getByRole("columnheader", { name: "σ (Å²)" })).toBeInTheDocument();
    expect(
      within(b2)
        .getAllByRole("row")
        .map((row) => row.textContent),
    ).toEqual(["Energy (eV)σ (Å²)", "0.12.5", "12.25", "100"]);

    // Rates span decades: printed in powers of ten, four significant digits at most.
    await user.click(screen.getByText("Numbers (1 table)"));
    const rates = await screen.findByRole("table", { name: "Elastic rate coefficient: k" });
    expect(within(rates).getByRole("columnheader", { name: "k (cm³ s⁻¹)" })).toBeInTheDocument();
    expect(within(rates).getByRole("cell", { name: "1.2 × 10⁻⁸" })).toBeInTheDocument();
    expect(within(rates).getByRole("cell", { name: "100000" })).toBeInTheDocument();

    const fit = screen.getByText(/k\(T\) = α \(T\/300 K\)/).parentElement as HTMLElement;
    expect(fit).toHaveTextContent("fitted over 1000–100000 K");
    expect(fit).toHaveTextContent("α = 2.5 × 10⁻⁹ cm³ s⁻¹");
    expect(fit).toHaveTextContent("β = 0.5");
    expect(fit).toHaveTextContent("γ = 120 K");
    expect(fit).toHaveTextContent("largest deviation from the computed rates: 3.1 %");
  });

  it("shows BEB per orbital with its total and the orbital table as one table", async () => {
    install();
    serveResults([ionizationResults()]);
    const { user } = renderApp(runPath);
    const heading = await screen.findByRole("heading", { name: "Ionization cross section" });
    const card = heading.closest("section") as HTMLElement;
    // The total's method once; each orbital's B, U, N behind "Method per series".
    expect(within(card).getByText(/sum over 2 occupied orbitals/)).toBeVisible();
    const perSeries = within(card).getByText("Method per series").closest("details") as HTMLElement;
    expect(perSeries).not.toHaveAttribute("open");
    expect(within(perSeries).getByText(/orbital 1b1: B = 13.85 eV/)).toBeInTheDocument();
    expect(within(perSeries).getByText(/orbital 3a1: B = 15.87 eV/)).toBeInTheDocument();
    expect(within(card).getAllByText(/Binary-Encounter-Bethe model/)).toHaveLength(3);
    await user.click(within(card).getByText("Numbers (3 tables)"));
    expect(
      await within(card).findByRole("table", { name: "Ionization cross section: 1b1" }),
    ).toBeInTheDocument();
    expect(within(card).getByRole("table", { name: "Ionization cross section: Total" })).toBeInTheDocument();

    const table = screen.getByRole("table", { name: "Orbitals used by the ionization model" });
    expect(
      within(table)
        .getAllByRole("row")
        .map((row) => row.textContent),
    ).toEqual([
      "OrbitalIrrepOrbital energy (eV)Binding energy (eV)Kinetic energy (eV)Occupation (electrons)",
      "1b1B1−13.8513.8559.522",
      "3a1A1−15.8715.8761.912",
    ]);

    // The target's properties from the same calculation: one quantity per line, units from the names.
    const properties = screen.getByRole("table", {
      name: "Target properties from the orbitals' calculation",
    });
    expect(
      within(properties)
        .getAllByRole("row")
        .map((row) => row.textContent),
    ).toEqual([
      "QuantityValue",
      "Total energy (Eₕ)−76.02",
      "Dipole z (D)−2.057",
      "Dipole magnitude (D)2.057",
      "Rotational constant a (cm⁻¹)27.38",
    ]);
  });

  it("puts a done run's results right under its summary, before its history", async () => {
    install();
    serveResults([derivedResults()]);
    renderApp(runPath);
    await screen.findByRole("heading", { name: "Elastic cross section" });
    const headings = screen
      .getAllByRole("heading", { level: 2 })
      .map((heading) => heading.textContent)
      .filter((text) => ["Results", "History", "Collected files", "Log"].includes(text ?? ""));
    expect(headings).toEqual(["Results", "History", "Collected files", "Log"]);
  });

  it("shows a real run's many tables without putting their rows on the page, one method per chart", async () => {
    install();
    serveResults([waterShapedResults()]);
    const { user } = renderApp(runPath);
    const heading = await screen.findByRole("heading", { name: "Elastic cross section" });
    const card = heading.closest("section") as HTMLElement;
    // The sum's method once; the four irreps' behind the disclosure.
    expect(within(card).getByText(/Summed over 4 irreps\./)).toBeVisible();
    const perSeries = within(card).getByText("Method per series").closest("details") as HTMLElement;
    expect(within(perSeries).getAllByText(/Irrep (A1|A2|B1|B2) only\./)).toHaveLength(4);
    // Only the orbital table (a row per orbital) is on the page until numbers are opened.
    expect(screen.queryByRole("table", { name: "Ionization cross section: Total" })).not.toBeInTheDocument();
    expect(screen.queryByRole("table", { name: "Elastic cross section: A1" })).not.toBeInTheDocument();
    const orbitalTable = screen.getByRole("table", { name: "Orbitals used by the ionization model" });
    expect(within(orbitalTable).getAllByRole("row")).toHaveLength(6);
    const bebCard = screen.getByRole("heading", { name: "Ionization cross section" }).closest("section")!;
    await user.click(within(bebCard as HTMLElement).getByText("Numbers (6 tables)"));
    const total = await within(bebCard as HTMLElement).findByRole("table", {
      name: "Ionization cross section: Total",
    });
    // 211 energies and the header.
    expect(within(total).getAllByRole("row")).toHaveLength(212);
    // Rates more than twelve decades below the largest are named, not silently dropped.
    expect(screen.getByText(/values lie more than 12 decades below the largest/)).toBeInTheDocument();
  });

  it("says results are being derived and asks again until they are", async () => {
    install();
    const pending: RunResults = { ...derivedResults(), state: "pending", results: [] };
    const served = serveResults([pending, derivedResults()]);
    renderApp(runPath);
    expect(await screen.findByText("Deriving results from the collected files…")).toBeInTheDocument();
    expect(screen.queryByText(RESULTS_CAUTION)).not.toBeInTheDocument();
    // The section refreshes itself every few seconds while the state is pending.
    expect(
      await screen.findByRole("heading", { name: "Elastic cross section" }, { timeout: 10_000 }),
    ).toBeInTheDocument();
    expect(screen.queryByText("Deriving results from the collected files…")).not.toBeInTheDocument();
    expect(served.calls()).toBeGreaterThanOrEqual(2);
  });

  it("shows why deriving failed and still lists the collected files", async () => {
    install();
    const message =
      "results could not be derived: kmatrices.txt line 12: expected 4 K-matrix values, found 3";
    serveResults([{ ...derivedResults(), state: "failed", message, results: [] }]);
    renderApp(runPath);
    const notice = await screen.findByText(new RegExp(message));
    expect(notice.closest("[role=alert]")).toHaveTextContent("The collected files are listed below.");
    expect(screen.getByRole("link", { name: "outer/kmatrix.dat" })).toBeInTheDocument();
    expect(screen.queryByRole("heading", { name: "Elastic cross section" })).not.toBeInTheDocument();
  });

  it("gives the reason when a run has no results", async () => {
    install();
    const message = "The run's codes name no collected files to derive results from.";
    serveResults([{ ...derivedResults(), state: "none", message, results: [] }]);
    renderApp(runPath);
    expect(await screen.findByText(message)).toBeInTheDocument();
    expect(screen.queryByText(RESULTS_CAUTION)).not.toBeInTheDocument();
  });

  it("asks for results only once a run is done", async () => {
    install();
    const served = serveResults([derivedResults()]);
    renderApp(`/groups/${KESTREL_ID}/runs/${RUN_IDS.running}`);
    await screen.findByRole("progressbar", { name: "Progress of stage outer" });
    await waitFor(() => expect(screen.getByTestId("run-log")).not.toHaveTextContent("Loading…"));
    expect(screen.queryByRole("heading", { name: "Results" })).not.toBeInTheDocument();
    expect(served.calls()).toBe(0);
  });
});

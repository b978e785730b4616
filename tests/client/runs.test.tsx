/**
 * The runs pages against the fake API (shared/schemas/runs.ts is the contract): the list with
 * states and reasons, cancel for members (a POST carrying the CSRF token), read-only for collaborators,
 * a run's progress, history, timings, collected files and log, reused results, and the short run address
 * that run e-mails link to.
 */
import { screen, waitFor, within } from "@testing-library/react";
import { describe, expect, it } from "vitest";
import { installFakeApi } from "./support/fake-api";
import { KESTREL_ID, kestrel, people, tomasAsCollaborator } from "./support/fixtures";
import { renderApp } from "./support/render-app";
import { kestrelRuns, RUN_IDS } from "./support/run-fixtures";

const runsPath = `/groups/${KESTREL_ID}/runs`;

describe("runs page", () => {
  it("lists runs with their state, reason and core-hours, and a member cancels one", async () => {
    const api = installFakeApi({
      me: people.tomas,
      groups: [{ ...kestrel, myRole: "member" }],
      runs: { [KESTREL_ID]: kestrelRuns() },
    });
    const { user } = renderApp(runsPath);

    const table = await screen.findByRole("table", { name: `Runs of ${kestrel.name}` });
    const running = within(table).getByRole("row", { name: /HNCO cc-pVDZ inner region/ });
    expect(within(running).getByText("running")).toBeInTheDocument();
    expect(within(running).getByText("Started on the host")).toBeInTheDocument();
    expect(within(running).getByText("8.00 / —")).toBeInTheDocument();
    const done = within(table).getByRole("row", { name: /HNCO elastic/ });
    expect(within(done).getByText("8.00 / 1.25")).toBeInTheDocument();
    expect(within(done).getByRole("button", { name: "Resubmit" })).toBeInTheDocument();

    await user.click(within(running).getByRole("button", { name: "Cancel" }));
    // Asked first, with the safe answer focused; nothing is sent before the confirmation.
    const dialog = await screen.findByRole("dialog", { name: "Cancel HNCO cc-pVDZ inner region?" });
    expect(within(dialog).getByRole("button", { name: "Keep it" })).toHaveFocus();
    expect(api.requests.some((r) => r.method === "POST")).toBe(false);
    await user.click(within(dialog).getByRole("button", { name: "Cancel run" }));
    await waitFor(() => expect(api.requests.some((r) => r.method === "POST")).toBe(true));
    const post = api.requests.find((r) => r.method === "POST");
    expect(post?.path).toBe(`/api/runs/${RUN_IDS.running}/cancel`);
    expect(post?.headers.get("x-csrf-token")).toBe(people.tomas.csrfToken);
    expect(await within(running).findByRole("button", { name: "Cancelling…" })).toBeDisabled();
  });

  it("gives collaborators no actions", async () => {
    installFakeApi({
      me: tomasAsCollaborator(),
      groups: [{ ...kestrel, myRole: "collaborator" }],
      runs: { [KESTREL_ID]: kestrelRuns() },
    });
    renderApp(runsPath);
    const table = await screen.findByRole("table", { name: `Runs of ${kestrel.name}` });
    // The column headers sort (buttons); nothing acts on a run.
    expect(within(table).queryByRole("button", { name: /Cancel|Resubmit/ })).not.toBeInTheDocument();
    expect(within(table).queryByRole("checkbox")).not.toBeInTheDocument();
  });

  it("says so when the group has no runs", async () => {
    installFakeApi({ me: people.tomas, groups: [{ ...kestrel, myRole: "member" }] });
    renderApp(runsPath);
    expect(await screen.findByText("No runs yet")).toBeInTheDocument();
  });

  it("shows a run's history, timings, collected files and log", async () => {
    installFakeApi({
      me: people.tomas,
      groups: [{ ...kestrel, myRole: "member" }],
      runs: { [KESTREL_ID]: kestrelRuns() },
      logs: { [RUN_IDS.done]: "[sigmaflow] stage 1/2 inner: start\nsymmetry A' done in 41.5 s\n" },
    });
    renderApp(`${runsPath}/${RUN_IDS.done}`);
    expect(
      await screen.findByRole("heading", { level: 1, name: "HNCO elastic, 0.1–10 eV" }),
    ).toBeInTheDocument();
    const history = screen.getByRole("table", { name: "State changes" });
    expect(within(history).getByText("Finished; 1 result file(s) collected")).toBeInTheDocument();
    const file = screen.getByRole("link", { name: "outer/kmatrix.dat" });
    expect(file.getAttribute("href")).toMatch(
      new RegExp(`/api/runs/${RUN_IDS.done}/artifacts/5a1e0000-0000-4000-8000-0000000000cc$`),
    );
    await waitFor(() =>
      expect(screen.getByTestId("run-log")).toHaveTextContent("symmetry A' done in 41.5 s"),
    );
  });

  it("shows how far a running run has got", async () => {
    installFakeApi({
      me: people.tomas,
      groups: [{ ...kestrel, myRole: "member" }],
      runs: { [KESTREL_ID]: kestrelRuns() },
    });
    renderApp(`${runsPath}/${RUN_IDS.running}`);
    const bar = await screen.findByRole("progressbar", { name: "Progress of stage outer" });
    expect(bar).toHaveAttribute("aria-valuenow", "25");
    expect(screen.getByText("Stage 2 of 3: outer, 25 % (3 of 12)")).toBeInTheDocument();
  });

  // Regression: the history said "worker" for a cancel and never who asked for it.
  it("names the person who cancelled a run in its history", async () => {
    installFakeApi({
      me: people.tomas,
      groups: [{ ...kestrel, myRole: "member" }],
      runs: { [KESTREL_ID]: kestrelRuns() },
    });
    renderApp(`${runsPath}/${RUN_IDS.cancelled}`);
    const history = await screen.findByRole("table", { name: "State changes" });
    const cancelled = within(history).getByRole("row", { name: /Cancelled; the scheduler confirmed/ });
    expect(within(cancelled).getByText("Noor Vasquez")).toBeInTheDocument();
    const collecting = within(history).getByRole("row", { name: /reports the job cancelled/ });
    expect(within(collecting).getByText("Sigmaflow")).toBeInTheDocument();
  });

  // Regression: a run that reused results showed an empty log and no word of where its results came from.
  it("says where reused results come from, links to that run and shows its log", async () => {
    installFakeApi({
      me: people.tomas,
      groups: [{ ...kestrel, myRole: "member" }],
      runs: { [KESTREL_ID]: kestrelRuns() },
      // The server answers a reusing run's log request with the original's chunks.
      logs: { [RUN_IDS.reused]: "[sigmaflow] stage 1/2 inner: start\nsymmetry A' done in 41.5 s\n" },
    });
    const { user, router } = renderApp(`${runsPath}/${RUN_IDS.reused}`);
    const notice = (await screen.findByText("Results reused")).closest("[role=status]") as HTMLElement;
    expect(notice).toHaveTextContent("Results reused from run");
    const origin = await within(notice).findByRole("link", { name: "HNCO elastic, 0.1–10 eV" });
    await waitFor(() =>
      expect(screen.getByTestId("run-log")).toHaveTextContent("symmetry A' done in 41.5 s"),
    );
    await user.click(origin);
    expect(
      await screen.findByRole("heading", { level: 1, name: "HNCO elastic, 0.1–10 eV" }),
    ).toBeInTheDocument();
    expect(router.state.location.pathname).toBe(`${runsPath}/${RUN_IDS.done}`);
  });

  // Regression: the run-finished e-mail links to /runs/<id>, which was "Page not found".
  it("opens the run's page in its group from the address in a run e-mail", async () => {
    installFakeApi({
      me: people.tomas,
      groups: [{ ...kestrel, myRole: "member" }],
      runs: { [KESTREL_ID]: kestrelRuns() },
    });
    const { router } = renderApp(`/runs/${RUN_IDS.done}`);
    expect(
      await screen.findByRole("heading", { level: 1, name: "HNCO elastic, 0.1–10 eV" }),
    ).toBeInTheDocument();
    expect(router.state.location.pathname).toBe(`${runsPath}/${RUN_IDS.done}`);
    expect(screen.queryByText("Page not found")).not.toBeInTheDocument();
  });
});

/**
 * The runs pages against the fake API (shared/schemas/execution/runs.ts is the contract): the list with
 * states and reasons, cancel for members (a POST carrying the CSRF token), read-only for collaborators,
 * and a run's history, timings, collected files and log.
 */
import { screen, waitFor, within } from "@testing-library/react";
import { describe, expect, it } from "vitest";
import { installFakeApi } from "./support/fake-api";
import { KESTREL_ID, kestrel, people } from "./support/fixtures";
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
    await waitFor(() => expect(api.requests.some((r) => r.method === "POST")).toBe(true));
    const post = api.requests.find((r) => r.method === "POST");
    expect(post?.path).toBe(`/api/runs/${RUN_IDS.running}/cancel`);
    expect(post?.headers.get("x-csrf-token")).toBe(people.tomas.csrfToken);
    expect(await within(running).findByRole("button", { name: "Cancelling…" })).toBeDisabled();
  });

  it("gives collaborators no actions", async () => {
    const collaborator = {
      ...people.tomas,
      memberships: people.tomas.memberships.map((m) => ({ ...m, role: "collaborator" as const })),
    };
    installFakeApi({
      me: collaborator,
      groups: [{ ...kestrel, myRole: "collaborator" }],
      runs: { [KESTREL_ID]: kestrelRuns() },
    });
    renderApp(runsPath);
    const table = await screen.findByRole("table", { name: `Runs of ${kestrel.name}` });
    expect(within(table).queryByRole("button")).not.toBeInTheDocument();
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
});

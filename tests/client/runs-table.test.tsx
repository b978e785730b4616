/**
 * The runs table's view in the address and its bulk actions, against msw (contract: runListQuerySchema
 * and runListSchema in shared/schemas/runs.ts): a shared address's filters, sort and page reach the API
 * and show in the controls; changing a filter or a sort rewrites the address and goes back to the first
 * page; bulk cancel asks first and reports each run that failed; bulk resubmit sends one request per run.
 */
import { screen, waitFor, within } from "@testing-library/react";
import { HttpResponse, http } from "msw";
import { describe, expect, it } from "vitest";
import { installFakeApi } from "./support/fake-api";
import { KESTREL_ID, kestrel, people, tomasAsCollaborator, USER_IDS } from "./support/fixtures";
import { renderApp } from "./support/render-app";
import { kestrelRuns, RUN_IDS } from "./support/run-fixtures";
import { server } from "./support/server";

const runsPath = `/groups/${KESTREL_ID}/runs`;

/** The list's requests as the server saw them (query included), answered from the fixtures. */
function recordListQueries() {
  const queries: URLSearchParams[] = [];
  const runs = kestrelRuns();
  server.use(
    http.get("/api/groups/:groupId/runs", ({ request }) => {
      const search = new URL(request.url).searchParams;
      queries.push(search);
      const states = search.getAll("state");
      const matching = states.length > 0 ? runs.filter((run) => states.includes(run.state)) : runs;
      return HttpResponse.json({
        runs: matching,
        total: matching.length + 100,
        page: Number(search.get("page") ?? 1),
        pageSize: Number(search.get("pageSize") ?? 50),
      });
    }),
  );
  return queries;
}

describe("the runs table's view in the address", () => {
  it("asks the API for a shared address's view and shows it in the controls", async () => {
    installFakeApi({ me: people.tomas, groups: [{ ...kestrel, myRole: "member" }] });
    const queries = recordListQueries();
    renderApp(
      `${runsPath}?state=running&state=done&submittedById=${USER_IDS.tomas}&sort=name&order=asc&page=2&pageSize=25`,
    );
    const table = await screen.findByRole("table", { name: `Runs of ${kestrel.name}` });
    const asked = queries.at(-1)!;
    expect(asked.getAll("state")).toEqual(["running", "done"]);
    expect(asked.get("submittedById")).toBe(USER_IDS.tomas);
    expect(asked.get("sort")).toBe("name");
    expect(asked.get("order")).toBe("asc");
    expect(asked.get("page")).toBe("2");
    expect(asked.get("pageSize")).toBe("25");

    const filters = screen.getByRole("region", { name: "Filters" });
    expect(within(filters).getByRole("checkbox", { name: "running" })).toBeChecked();
    expect(within(filters).getByRole("checkbox", { name: "done" })).toBeChecked();
    expect(within(filters).getByRole("checkbox", { name: "queued" })).not.toBeChecked();
    await waitFor(() =>
      expect(within(filters).getByRole("combobox", { name: "Submitted by" })).toHaveDisplayValue(
        "Tomás Brandt",
      ),
    );
    expect(within(table).getByRole("columnheader", { name: /Run/ })).toHaveAttribute(
      "aria-sort",
      "ascending",
    );
    expect(within(table).getByRole("columnheader", { name: /State/ })).toHaveAttribute("aria-sort", "none");
    // The 3 running or done fixtures + 100 more in the answer's total, 25 a page: page 2 of 5.
    expect(screen.getByText(/26–28 of 103 runs · page 2 of 5/)).toBeInTheDocument();
  });

  it("rewrites the address when a filter, the sort or the page changes", async () => {
    installFakeApi({ me: people.tomas, groups: [{ ...kestrel, myRole: "member" }] });
    const queries = recordListQueries();
    const { user, router } = renderApp(`${runsPath}?page=3`);
    const table = await screen.findByRole("table", { name: `Runs of ${kestrel.name}` });
    const search = () => new URLSearchParams(router.state.location.search);

    await user.click(screen.getByRole("checkbox", { name: "running" }));
    await waitFor(() => expect(search().getAll("state")).toEqual(["running"]));
    expect(search().get("page")).toBeNull(); // back to the first page
    await waitFor(() => expect(queries.at(-1)!.getAll("state")).toEqual(["running"]));

    // A state sort starts at the top of the lifecycle (ascending), then turns round.
    await user.click(within(table).getByRole("button", { name: /State/ }));
    await waitFor(() => expect(search().get("sort")).toBe("state"));
    expect(search().get("order")).toBe("asc");
    await waitFor(() =>
      expect(screen.getByRole("columnheader", { name: /State/ })).toHaveAttribute("aria-sort", "ascending"),
    );
    await user.click(screen.getByRole("button", { name: /State/ }));
    await waitFor(() => expect(search().get("order")).toBeNull()); // descending, the default direction
    await waitFor(() =>
      expect(screen.getByRole("columnheader", { name: /State/ })).toHaveAttribute("aria-sort", "descending"),
    );
    await waitFor(() => expect(queries.at(-1)!.get("order")).toBeNull());
    expect(queries.at(-1)!.get("sort")).toBe("state");

    await user.click(screen.getByRole("button", { name: "Next" }));
    await waitFor(() => expect(search().get("page")).toBe("2"));
    expect(search().getAll("state")).toEqual(["running"]);

    // The browser's back button returns to the previous view.
    router.navigate(-1);
    await waitFor(() => expect(search().get("page")).toBeNull());
    expect(search().get("sort")).toBe("state");
  });

  it("leaves out what an edited address got wrong, and says so", async () => {
    installFakeApi({ me: people.tomas, groups: [{ ...kestrel, myRole: "member" }] });
    const queries = recordListQueries();
    renderApp(`${runsPath}?state=finished&state=done&sort=colour&pageSize=9999`);
    await screen.findByRole("table", { name: `Runs of ${kestrel.name}` });
    const asked = queries.at(-1)!;
    expect(asked.getAll("state")).toEqual(["done"]);
    expect(asked.get("sort")).toBeNull();
    expect(asked.get("pageSize")).toBeNull();
    expect(screen.getByText(/left out: state, sort, pageSize/)).toBeInTheDocument();
  });
});

describe("bulk actions on the selected runs", () => {
  it("cancels the selected unfinished runs after a confirmation and names each that failed", async () => {
    const runs = kestrelRuns();
    const queued = { ...runs[0]!, id: "5a1e0000-0000-4000-8000-000000000005", name: "Water queued" };
    queued.state = "queued";
    const api = installFakeApi({
      me: people.tomas,
      groups: [{ ...kestrel, myRole: "member" }],
      runs: { [KESTREL_ID]: [...runs, queued] },
    });
    server.use(
      http.post(`/api/runs/${queued.id}/cancel`, () =>
        HttpResponse.json(
          { error: { code: "conflict", message: "The run has already finished." } },
          { status: 409 },
        ),
      ),
    );
    const { user } = renderApp(runsPath);
    const table = await screen.findByRole("table", { name: `Runs of ${kestrel.name}` });
    await user.click(within(table).getByRole("checkbox", { name: "Select HNCO cc-pVDZ inner region" }));
    await user.click(within(table).getByRole("checkbox", { name: "Select Water queued" }));
    await user.click(within(table).getByRole("checkbox", { name: "Select HNCO elastic, 0.1–10 eV" }));
    const toolbar = screen.getByRole("toolbar", { name: "Selected runs" });
    expect(within(toolbar).getByText("3 selected")).toBeInTheDocument();
    // The finished run is not cancellable; it can be resubmitted.
    expect(within(toolbar).getByRole("button", { name: "Resubmit 1 run" })).toBeEnabled();

    await user.click(within(toolbar).getByRole("button", { name: "Cancel 2 runs…" }));
    const dialog = await screen.findByRole("dialog", { name: "Cancel 2 runs?" });
    expect(api.requests.filter((r) => r.method === "POST")).toEqual([]); // nothing before the answer
    await user.click(within(dialog).getByRole("button", { name: "Cancel runs" }));

    const report = await screen.findByRole("alert");
    expect(report).toHaveTextContent("Cancelled 1 of 2 runs");
    expect(report).toHaveTextContent("Water queued: The run has already finished.");
    expect(screen.queryByRole("dialog")).not.toBeInTheDocument();
    const posted = api.requests.filter((r) => r.method === "POST").map((r) => r.path);
    expect(posted).toEqual([`/api/runs/${RUN_IDS.running}/cancel`]);
    expect(api.requests.find((r) => r.method === "POST")?.headers.get("x-csrf-token")).toBe(
      people.tomas.csrfToken,
    );
    // The selection is cleared once the action is done.
    expect(screen.queryByRole("toolbar", { name: "Selected runs" })).not.toBeInTheDocument();
  });

  it("keeps the runs when the confirmation is declined", async () => {
    const api = installFakeApi({
      me: people.tomas,
      groups: [{ ...kestrel, myRole: "member" }],
      runs: { [KESTREL_ID]: kestrelRuns() },
    });
    const { user } = renderApp(runsPath);
    const table = await screen.findByRole("table", { name: `Runs of ${kestrel.name}` });
    await user.click(within(table).getByRole("checkbox", { name: "Select HNCO cc-pVDZ inner region" }));
    await user.click(screen.getByRole("button", { name: "Cancel 1 run…" }));
    const dialog = await screen.findByRole("dialog", { name: "Cancel 1 run?" });
    await user.click(within(dialog).getByRole("button", { name: "Keep them" }));
    expect(screen.queryByRole("dialog")).not.toBeInTheDocument();
    expect(api.requests.filter((r) => r.method === "POST")).toEqual([]);
  });

  it("resubmits every selected finished run, one request each", async () => {
    const resubmitted: string[] = [];
    installFakeApi({
      me: people.tomas,
      groups: [{ ...kestrel, myRole: "member" }],
      runs: { [KESTREL_ID]: kestrelRuns() },
    });
    server.use(
      http.post("/api/runs/:runId/resubmit", async ({ params, request }) => {
        resubmitted.push(String(params.runId));
        expect(await request.json()).toEqual({ changes: {} });
        const { spec: _s, events: _e, artifacts: _a, timings: _t, ...summary } = kestrelRuns()[1]!;
        return HttpResponse.json(
          { ...summary, id: `5a1e0000-0000-4000-8000-00000000010${resubmitted.length}`, state: "queued" },
          { status: 201 },
        );
      }),
    );
    const { user } = renderApp(runsPath);
    const table = await screen.findByRole("table", { name: `Runs of ${kestrel.name}` });
    await user.click(within(table).getByRole("checkbox", { name: "Select all runs on this page" }));
    const toolbar = screen.getByRole("toolbar", { name: "Selected runs" });
    expect(within(toolbar).getByText("4 selected")).toBeInTheDocument();
    // Done, reused (done) and cancelled are finished; the running one is not.
    await user.click(within(toolbar).getByRole("button", { name: "Resubmit 3 runs" }));
    expect(await screen.findByText("Resubmitted 3 of 3 runs")).toBeInTheDocument();
    expect(resubmitted.sort()).toEqual([RUN_IDS.done, RUN_IDS.reused, RUN_IDS.cancelled].sort());
  });

  it("offers no selection to collaborators", async () => {
    installFakeApi({
      me: tomasAsCollaborator(),
      groups: [{ ...kestrel, myRole: "collaborator" }],
      runs: { [KESTREL_ID]: kestrelRuns() },
    });
    renderApp(runsPath);
    const table = await screen.findByRole("table", { name: `Runs of ${kestrel.name}` });
    expect(within(table).queryByRole("checkbox")).not.toBeInTheDocument();
    // Sorting stays: the column headers are buttons.
    expect(within(table).getByRole("button", { name: /Submitted by/ })).toBeInTheDocument();
  });
});

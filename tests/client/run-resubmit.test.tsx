/**
 * Resubmitting a finished run with changes from its page, against the fake API (shared/schemas/runs.ts:
 * `resubmitRunRequestSchema`, `POST /api/runs/:runId/resubmit`): the form shows each stage's parameters
 * as the run used them, typed from the stage's code; only changed values are sent; mistakes and the
 * server's 422 are shown beside the field they are about.
 */
import type { Code, Host, Recipe, RunDetail } from "@shared/schemas";
import { screen, waitFor, within } from "@testing-library/react";
import { HttpResponse, http } from "msw";
import { describe, expect, it } from "vitest";
import { codeDefinition, hostFixture } from "./support/code-fixtures";
import { apiError, installFakeApi } from "./support/fake-api";
import { KESTREL_ID, kestrel, people } from "./support/fixtures";
import { renderApp } from "./support/render-app";
import { kestrelRuns, RUN_IDS } from "./support/run-fixtures";
import { server } from "./support/server";

const RECIPE_ID = "5a1e0000-0000-4000-8000-0000000000aa";
const ORBITALS_CODE_ID = "c0de0000-0000-4000-8000-000000000001";
const SCATTER_CODE_ID = "c0de0000-0000-4000-8000-000000000002";
const NEW_RUN_ID = "5a1e0000-0000-4000-8000-000000000099";

const recipe: Recipe = {
  id: RECIPE_ID,
  groupId: KESTREL_ID,
  name: "orbitals-then-scatter",
  description: "",
  stages: [
    { name: "orbitals", codeId: ORBITALS_CODE_ID, codeName: "hf-orbitals", codeVersion: "1.0" },
    { name: "scatter", codeId: SCATTER_CODE_ID, codeName: "radial-scatter", codeVersion: "0.3" },
  ],
  createdAt: "2026-11-01T09:00:00.000Z",
};

function code(id: string, name: string, version: string, parameters: Record<string, unknown>): Code {
  return {
    id,
    groupId: KESTREL_ID,
    createdAt: "2026-11-01T09:00:00.000Z",
    definition: codeDefinition({
      name,
      version,
      executable: "/usr/bin/true",
      parameters,
      defaults: { cores: 1, wallTimeMinutes: 60 },
    }),
  };
}

const codes: Record<string, Code> = {
  [ORBITALS_CODE_ID]: code(ORBITALS_CODE_ID, "hf-orbitals", "1.0", {
    type: "object",
    properties: {
      basis: { type: "string", enum: ["cc-pvdz", "aug-cc-pvdz", "cc-pvtz"] },
      scf_convergence: { type: "number", default: 1e-8 },
      use_symmetry: { type: "boolean", default: true },
    },
  }),
  [SCATTER_CODE_ID]: code(SCATTER_CODE_ID, "radial-scatter", "0.3", {
    type: "object",
    properties: { lmax: { type: "integer" }, energies_eV: { type: "array", items: { type: "number" } } },
  }),
};

function setUp(hosts: Host[] = []) {
  const runs = kestrelRuns();
  const done = runs.find((run) => run.id === RUN_IDS.done)!;
  done.spec = {
    ...done.spec,
    parameters: {
      orbitals: { basis: "cc-pvdz", scf_convergence: 1e-8 },
      scatter: { lmax: 4, energies_eV: [0.1, 1, 10] },
    },
  };
  const api = installFakeApi({
    me: people.tomas,
    groups: [{ ...kestrel, myRole: "member" }],
    runs: { [KESTREL_ID]: runs },
    hosts: { [KESTREL_ID]: hosts },
  });
  const posts: { path: string; csrf: string | null; body: unknown }[] = [];
  server.use(
    http.get("/api/runs/:runId/results", ({ params }) =>
      HttpResponse.json({
        runId: params.runId,
        state: "none",
        message: "No result files.",
        caution: "",
        results: [],
      }),
    ),
    http.get("/api/recipes/:recipeId", () => HttpResponse.json(recipe)),
    http.get("/api/codes/:codeId", ({ params }) => HttpResponse.json(codes[String(params.codeId)])),
    http.post("/api/runs/:runId/resubmit", async ({ request }) => {
      const body = await request.json();
      posts.push({ path: new URL(request.url).pathname, csrf: request.headers.get("x-csrf-token"), body });
      const created: RunDetail = {
        ...done,
        id: NEW_RUN_ID,
        name: "HNCO elastic, aug-cc-pVDZ",
        state: "queued",
        resubmittedFrom: done.id,
        events: [],
        artifacts: [],
      };
      api.state.runs[KESTREL_ID]!.unshift(created);
      return HttpResponse.json(created, { status: 201 });
    }),
  );
  return { posts };
}

async function openForm() {
  const rendered = renderApp(`/groups/${KESTREL_ID}/runs/${RUN_IDS.done}`);
  await rendered.user.click(await screen.findByRole("button", { name: "Resubmit with changes…" }));
  const dialog = await screen.findByRole("dialog", { name: "Resubmit with changes" });
  // The fields appear once the stages' codes are read.
  await within(dialog).findByLabelText("basis");
  return { ...rendered, dialog };
}

describe("resubmit with changes", () => {
  it("sends another host when one is chosen, and offers no host where a stage's code is missing", async () => {
    const runs = kestrelRuns();
    const currentHostId = runs.find((run) => run.id === RUN_IDS.done)!.spec.hostId;
    const gannet = hostFixture("4057aaaa-0000-4000-8000-0000000000a1", "gannet");
    const petrel = hostFixture("4057aaaa-0000-4000-8000-0000000000a2", "petrel", "direct");
    const { posts } = setUp([hostFixture(currentHostId, "tern"), gannet, petrel]);
    // The scatter code is installed on tern and gannet only.
    server.use(
      http.get("/api/codes/:codeId", ({ params }) => {
        const code = codes[String(params.codeId)]!;
        return HttpResponse.json(
          params.codeId === SCATTER_CODE_ID ? { ...code, hostIds: [currentHostId, gannet.id] } : code,
        );
      }),
    );
    const { user, dialog } = await openForm();
    const hostSelect = within(dialog).getByLabelText("Host");
    await waitFor(() => expect(within(hostSelect).getAllByRole("option")).toHaveLength(3));
    expect(hostSelect).toHaveValue(currentHostId);
    const petrelOption = within(hostSelect).getByRole("option", { name: /^petrel/ });
    expect(petrelOption).toBeDisabled();
    expect(petrelOption).toHaveTextContent("petrel (direct) — stage scatter's code is not installed here");
    expect(within(hostSelect).getByRole("option", { name: /^gannet/ })).toBeEnabled();

    await user.selectOptions(hostSelect, gannet.id);
    await user.click(within(dialog).getByRole("button", { name: "Resubmit with these changes" }));
    await waitFor(() => expect(posts).toHaveLength(1));
    expect(posts[0]!.body).toEqual({ changes: { hostId: gannet.id } });
  });

  it("sends exactly the changed parameter and opens the new run", async () => {
    const { posts } = setUp();
    const { user, dialog, router } = await openForm();
    const basis = within(dialog).getByLabelText("basis");
    expect(basis).toHaveValue(JSON.stringify("cc-pvdz"));
    expect(within(dialog).getByLabelText("lmax")).toHaveValue("4");
    expect(within(dialog).getByLabelText("energies_eV")).toHaveValue("[0.1,1,10]");
    // Declared but not set by the run: empty, so the code's default keeps applying.
    expect(within(dialog).getByLabelText("use_symmetry")).toHaveValue("");

    await user.selectOptions(basis, "aug-cc-pvdz");
    await user.click(within(dialog).getByRole("button", { name: "Resubmit with these changes" }));

    await waitFor(() => expect(posts).toHaveLength(1));
    expect(posts[0]!.path).toBe(`/api/runs/${RUN_IDS.done}/resubmit`);
    expect(posts[0]!.csrf).toBe(people.tomas.csrfToken);
    expect(posts[0]!.body).toEqual({ changes: { parameters: { orbitals: { basis: "aug-cc-pvdz" } } } });
    expect(
      await screen.findByRole("heading", { level: 1, name: "HNCO elastic, aug-cc-pVDZ" }),
    ).toBeInTheDocument();
    expect(router.state.location.pathname).toBe(`/groups/${KESTREL_ID}/runs/${NEW_RUN_ID}`);
    expect(screen.queryByRole("dialog")).not.toBeInTheDocument();
  });

  it("opens on the name field, keeps focus inside and closes with Escape", async () => {
    setUp();
    const { user, dialog } = await openForm();
    expect(within(dialog).getByLabelText("Name of the new run")).toHaveFocus();
    await user.keyboard("{Shift>}{Tab}{/Shift}");
    expect(within(dialog).getByRole("button", { name: "Resubmit with these changes" })).toHaveFocus();
    await user.keyboard("{Escape}");
    expect(screen.queryByRole("dialog")).not.toBeInTheDocument();
    expect(screen.getByRole("button", { name: "Resubmit with changes…" })).toHaveFocus();
  });

  it("shows a value that is not JSON beside its field and sends nothing", async () => {
    const { posts } = setUp();
    const { user, dialog } = await openForm();
    const energies = within(dialog).getByLabelText("energies_eV");
    await user.clear(energies);
    // "[[" types one "[" (user-event reads "[" as the start of a key name).
    await user.type(energies, "[[0.1, 1,");
    const lmax = within(dialog).getByLabelText("lmax");
    await user.clear(lmax);
    await user.type(lmax, "4.5");
    await user.click(within(dialog).getByRole("button", { name: "Resubmit with these changes" }));
    expect(energies).toHaveAccessibleDescription(/Not valid JSON/);
    expect(lmax).toHaveAccessibleDescription(/Give a whole number/);
    expect(posts).toHaveLength(0);
  });

  it("shows the server's objection beside the parameter it names", async () => {
    setUp();
    server.use(
      http.post("/api/runs/:runId/resubmit", () =>
        apiError(422, "validation_failed", "The parameters do not fit the stages' codes.", [
          { path: "spec.parameters.scatter.lmax", message: "must be <= 8" },
        ]),
      ),
    );
    const { user, dialog } = await openForm();
    const lmax = within(dialog).getByLabelText("lmax");
    await user.clear(lmax);
    await user.type(lmax, "12");
    await user.click(within(dialog).getByRole("button", { name: "Resubmit with these changes" }));
    await waitFor(() => expect(lmax).toHaveAccessibleDescription("must be <= 8"));
    expect(screen.getByRole("dialog")).toBeInTheDocument();
  });

  it("says so when nothing was changed", async () => {
    const { posts } = setUp();
    const { user, dialog } = await openForm();
    await user.click(within(dialog).getByRole("button", { name: "Resubmit with these changes" }));
    expect(within(dialog).getByText(/Nothing was changed/)).toBeInTheDocument();
    expect(posts).toHaveLength(0);
  });
});

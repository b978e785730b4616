/**
 * The run composer (`/groups/:groupId/runs/new`) against the fake API: the stage's parameter form is drawn
 * from its code's JSON Schema and checked with it before anything is sent; the server's preview
 * (`POST /api/groups/:groupId/runs/preview`, shared/schemas/run-preview.ts) shows the cost and balance
 * with units, and an identical finished run is offered for reuse before any allocation is spent.
 */
import type { Code, Host, Recipe, RunDetail, RunPreview } from "@shared/schemas";
import { screen, waitFor, within } from "@testing-library/react";
import { HttpResponse, http } from "msw";
import { describe, expect, it } from "vitest";
import { codeDefinition, hostFixture } from "./support/code-fixtures";
import { installFakeApi } from "./support/fake-api";
import { KESTREL_ID, kestrel, people } from "./support/fixtures";
import { renderApp } from "./support/render-app";
import { kestrelRuns } from "./support/run-fixtures";
import { server } from "./support/server";
import { TARGET_IDS, targetList } from "./support/target-fixtures";

const RECIPE_ID = "5a1e0000-0000-4000-8000-0000000000aa";
const HOST_ID = "5a1e0000-0000-4000-8000-0000000000bb";
const DEV_HOST_ID = "5a1e0000-0000-4000-8000-0000000000cc";
const CODE_ID = "c0de0000-0000-4000-8000-000000000002";
const NEW_RUN_ID = "5a1e0000-0000-4000-8000-000000000077";
const EARLIER_RUN_ID = "5a1e0000-0000-4000-8000-000000000002";

const recipe: Recipe = {
  id: RECIPE_ID,
  groupId: KESTREL_ID,
  name: "elastic",
  description: "",
  stages: [{ name: "scatter", codeId: CODE_ID, codeName: "radial-scatter", codeVersion: "1.0" }],
  createdAt: "2026-11-01T09:00:00.000Z",
};

/** The parameters of Sigmaflow's demo scattering code (deploy/demo/codes/radial-scatter.ts), abridged. */
const parameters = {
  type: "object",
  additionalProperties: false,
  required: ["polarizabilityBohr3"],
  properties: {
    lmax: { type: "integer", minimum: 0, maximum: 12, default: 6, description: "Highest partial wave l." },
    energiesEv: {
      type: "array",
      items: { type: "number", exclusiveMinimum: 0, maximum: 1000 },
      minItems: 1,
      maxItems: 2000,
      default: [0.1, 1, 10],
      description: "Collision energies in eV, strictly increasing.",
    },
    polarizabilityBohr3: {
      type: "number",
      minimum: 0,
      maximum: 1000,
      description: "Mean dipole polarizability of the target, bohr³.",
    },
    model: { type: "string", enum: ["static", "static-polarization"], default: "static-polarization" },
  },
};

const code: Code = {
  id: CODE_ID,
  groupId: KESTREL_ID,
  createdAt: "2026-11-01T09:00:00.000Z",
  definition: codeDefinition({
    name: "radial-scatter",
    executable: "/usr/bin/true",
    parameters,
    defaults: { cores: 1, wallTimeMinutes: 60 },
  }),
};

const host = hostFixture(HOST_ID, "tern", "slurm");

type SpecBody = {
  name: string;
  targetId?: string;
  parameters: Record<string, Record<string, unknown>>;
  resources: { cores?: number; wallTimeMinutes?: number };
};

/** The preview as the server would answer it: cost = cores × wall time, out of 1000 core-hours. */
function previewOf(spec: SpecBody, reusable: RunPreview["reusable"]): RunPreview {
  const cores = spec.resources.cores ?? 1;
  const wallTimeMinutes = spec.resources.wallTimeMinutes ?? 60;
  const costCoreHours = (cores * wallTimeMinutes) / 60;
  const file = (relativePath: string, text: string) => ({
    relativePath,
    sizeBytes: text.length,
    sha256: "0".repeat(64),
    text,
    truncated: false,
  });
  return {
    resources: { cores, wallTimeMinutes },
    costCoreHours,
    allocation: {
      id: "a110c000-0000-4000-8000-000000000001",
      name: "Winter quarter",
      availableCoreHoursBefore: 1000,
      availableCoreHoursAfter: 1000 - costCoreHours,
    },
    refusal: null,
    fingerprint: "f".repeat(64),
    stages: [
      {
        index: 1,
        name: "scatter",
        codeName: "radial-scatter",
        codeVersion: "1.0",
        parameters: spec.parameters.scatter ?? {},
        files: [file("stage-1-scatter/input.json", JSON.stringify(spec.parameters.scatter))],
      },
    ],
    script: file("job.sh", "#!/bin/sh\n"),
    reusable,
  };
}

function setUp(options: { reusable?: RunPreview["reusable"] } = {}) {
  const runs = kestrelRuns();
  const api = installFakeApi({
    me: people.tomas,
    groups: [{ ...kestrel, myRole: "member" }],
    runs: { [KESTREL_ID]: runs },
  });
  const previews: SpecBody[] = [];
  const submissions: { spec: SpecBody; onDuplicate: string; csrf: string | null }[] = [];
  server.use(
    http.get("/api/groups/:groupId/targets", () => HttpResponse.json(targetList())),
    http.get("/api/groups/:groupId/recipes", () => HttpResponse.json({ recipes: [recipe] })),
    http.get("/api/groups/:groupId/hosts", () => HttpResponse.json({ hosts: [host] })),
    http.get("/api/recipes/:recipeId", () => HttpResponse.json(recipe)),
    http.get("/api/codes/:codeId", () => HttpResponse.json(code)),
    http.get("/api/runs/:runId/results", ({ params }) =>
      HttpResponse.json({ runId: params.runId, state: "none", message: "", caution: "", results: [] }),
    ),
    http.post("/api/groups/:groupId/runs/preview", async ({ request }) => {
      const { spec } = (await request.json()) as { spec: SpecBody };
      previews.push(spec);
      return HttpResponse.json(previewOf(spec, options.reusable ?? null));
    }),
    http.post("/api/groups/:groupId/runs", async ({ request }) => {
      const body = (await request.json()) as { spec: SpecBody; onDuplicate: string };
      submissions.push({ ...body, csrf: request.headers.get("x-csrf-token") });
      const created: RunDetail = {
        ...runs[0]!,
        id: NEW_RUN_ID,
        name: body.spec.name,
        state: "queued",
        events: [],
      };
      api.state.runs[KESTREL_ID]!.unshift(created);
      return HttpResponse.json(created, { status: 201 });
    }),
  );
  return { api, previews, submissions };
}

async function openComposer() {
  const rendered = renderApp(`/groups/${KESTREL_ID}/runs/new`);
  const { user } = rendered;
  await screen.findByRole("heading", { name: "New run" });
  await user.type(screen.getByLabelText("Run name"), "Water elastic");
  await user.selectOptions(await screen.findByLabelText("Target"), TARGET_IDS.water);
  await user.selectOptions(screen.getByLabelText("Recipe"), RECIPE_ID);
  await user.selectOptions(await screen.findByLabelText("Host"), HOST_ID);
  // The stage's fields appear once its code is read; the unit comes from the schema's description.
  await screen.findByLabelText("Polarizability (bohr³)");
  return rendered;
}

describe("run composer", () => {
  it("opens without complaints, and names every missing choice when the researcher submits", async () => {
    const { submissions, previews } = setUp();
    const { user } = renderApp(`/groups/${KESTREL_ID}/runs/new`);
    await screen.findByRole("heading", { name: "New run" });
    const name = screen.getByLabelText("Run name");
    await screen.findByRole("option", { name: /^elastic/ });
    // Nothing was typed or chosen yet: no field is marked wrong.
    for (const label of ["Run name", "Recipe", "Host"]) {
      expect(screen.getByLabelText(label)).not.toHaveAttribute("aria-invalid", "true");
    }
    expect(screen.queryByRole("alert")).toBeNull();
    // Pressing Submit names the missing name, recipe and host at their fields, and moves to the first.
    await user.click(screen.getByRole("button", { name: "Submit run" }));
    await waitFor(() => expect(name).toHaveAttribute("aria-invalid", "true"));
    await waitFor(() => expect(name).toHaveFocus());
    expect(screen.getByText("Give the run a name (at most 120 characters).")).toBeInTheDocument();
    expect(screen.getByText("Choose a recipe.")).toBeInTheDocument();
    expect(screen.getByText("Choose a host.")).toBeInTheDocument();
    expect(submissions).toHaveLength(0);
    expect(previews).toHaveLength(0);
  });

  it("shows a value the code's schema refuses beside its field and sends nothing", async () => {
    const { previews, submissions } = setUp();
    const { user } = await openComposer();
    const lmax = screen.getByLabelText("lmax");
    // Defaults are pre-filled from the schema.
    expect(lmax).toHaveValue("6");
    expect(screen.getByLabelText("Model")).toHaveValue("static-polarization");
    await user.clear(lmax);
    await user.type(lmax, "40");
    await user.type(screen.getByLabelText("Polarizability (bohr³)"), "9.6");
    await waitFor(() => expect(lmax).toHaveAttribute("aria-invalid", "true"));
    const errorId = lmax
      .getAttribute("aria-describedby")!
      .split(" ")
      .find((id) => id.endsWith("-error"))!;
    // The schema's "maximum: 12" as a sentence, and the hint's bounds as a sentence too.
    expect(document.getElementById(errorId)).toHaveTextContent(/^At most 12\.$/);
    const hintId = lmax
      .getAttribute("aria-describedby")!
      .split(" ")
      .find((id) => id.endsWith("-hint"))!;
    expect(document.getElementById(hintId)).toHaveTextContent(
      /^Highest partial wave l\. A whole number from 0 to 12\. Default: 6\.$/,
    );
    // A bound with a unit names it.
    const polarizability = screen.getByLabelText("Polarizability (bohr³)");
    await user.clear(polarizability);
    await user.type(polarizability, "2000");
    await waitFor(() => expect(polarizability).toHaveAttribute("aria-invalid", "true"));
    const polarizabilityError = polarizability
      .getAttribute("aria-describedby")!
      .split(" ")
      .find((id) => id.endsWith("-error"))!;
    expect(document.getElementById(polarizabilityError)).toHaveTextContent(/^At most 1000 bohr³\.$/);
    // The collision energies are labelled in words with their unit.
    expect(screen.getByText("Energies (eV)")).toBeInTheDocument();
    // The required parameter left empty is named at its field too.
    await user.clear(screen.getByLabelText("Polarizability (bohr³)"));
    await waitFor(() =>
      expect(screen.getByLabelText("Polarizability (bohr³)")).toHaveAttribute("aria-invalid", "true"),
    );
    await user.click(screen.getByRole("button", { name: "Submit run" }));
    expect(submissions).toHaveLength(0);
    expect(previews).toHaveLength(0);
  });

  it("shows the cost and balance in core-hours before submitting, then opens the new run", async () => {
    const { previews, submissions } = setUp();
    const { user, router } = await openComposer();
    await user.type(screen.getByLabelText("Polarizability (bohr³)"), "9.6");
    await user.type(screen.getByLabelText("Cores"), "4");
    await user.type(screen.getByLabelText("Wall-time limit (min)"), "90");
    const summary = await screen.findByLabelText("Allocation cost");
    // 4 cores × 90 min = 6 core-hours, out of 1000 available.
    await waitFor(() => expect(summary).toHaveTextContent("6 core-hours (4 cores × 90 min)"));
    expect(summary).toHaveTextContent("1,000 core-hours available → 994 core-hours after");
    expect(previews.at(-1)).toMatchObject({
      name: "Water elastic",
      targetId: TARGET_IDS.water,
      resources: { cores: 4, wallTimeMinutes: 90 },
      parameters: { scatter: { lmax: 6, polarizabilityBohr3: 9.6, model: "static-polarization" } },
    });
    await user.click(screen.getByRole("button", { name: "Submit run" }));
    await waitFor(() =>
      expect(router.state.location.pathname).toBe(`/groups/${KESTREL_ID}/runs/${NEW_RUN_ID}`),
    );
    expect(submissions).toHaveLength(1);
    expect(submissions[0]).toMatchObject({ onDuplicate: "ask", spec: previews.at(-1) });
    expect(submissions[0]!.csrf).toBeTruthy();
  });

  it("fills the energies from the grid builder (log spacing, eV)", async () => {
    const { previews } = setUp();
    const { user } = await openComposer();
    await user.type(screen.getByLabelText("Polarizability (bohr³)"), "9.6");
    const grid = screen.getByRole("group", { name: /Energies: energy grid/ });
    for (const [label, value] of [
      ["Start (eV)", "1"],
      ["End (eV)", "10"],
      ["Points", "10"],
    ] as const) {
      await user.clear(within(grid).getByLabelText(label));
      await user.type(within(grid).getByLabelText(label), value);
    }
    expect(within(grid).getByText(/^10 points \(eV\): 1, 1\.292, 1\.668/)).toBeInTheDocument();
    await user.click(within(grid).getByRole("button", { name: "Use these 10 energies" }));
    await waitFor(() => expect(previews.at(-1)?.parameters.scatter?.energiesEv).toHaveLength(10));
    const energies = previews.at(-1)!.parameters.scatter!.energiesEv as number[];
    // Log spacing E_k = 1 eV · 10^(k/9) (analytic): E_1 = 10^(1/9) = 1.29155 eV, last exactly 10 eV.
    expect(energies[0]).toBe(1);
    expect(energies[1]).toBeCloseTo(10 ** (1 / 9), 12);
    expect(energies[9]).toBe(10);
  });

  it("offers an identical finished run's results before spending allocation", async () => {
    const { submissions } = setUp({
      reusable: {
        id: EARLIER_RUN_ID,
        name: "Water elastic (earlier)",
        finishedAt: "2026-12-01T08:00:00.000Z",
        resultsState: "derived",
      },
    });
    const { user } = await openComposer();
    await user.type(screen.getByLabelText("Polarizability (bohr³)"), "9.6");
    const offer = await screen.findByRole("region", { name: "These inputs already ran" });
    expect(offer).toHaveTextContent("“Water elastic (earlier)”");
    expect(offer).toHaveTextContent("results: derived");
    expect(offer).toHaveTextContent("costs 0 core-hours");
    expect(screen.queryByRole("button", { name: "Submit run" })).toBeNull();
    await user.click(within(offer).getByRole("button", { name: "Reuse its results" }));
    await waitFor(() => expect(submissions).toHaveLength(1));
    expect(submissions[0]!.onDuplicate).toBe("reuse");
  });

  it("attaches extra input files per stage, lists them with their size, and shows refusals beside the control", async () => {
    const { previews, submissions } = setUp();
    const { user } = await openComposer();
    await user.type(screen.getByLabelText("Polarizability (bohr³)"), "9.6");
    const picker = screen.getByLabelText("Extra input files for scatter");
    // A text basis file and bytes that are not UTF-8: both must travel as their exact bytes (base64).
    const basis = new File(["H 0\nS 1 1.00\n"], "basis.gbs");
    const restartBytes = new Uint8Array([0x00, 0xff, 0xfe, 0x80, 0x0a]);
    const restart = new File([restartBytes], "restart.bin");
    await user.upload(picker, [basis, restart]);
    const list = await screen.findByRole("list", { name: "Extra input files for scatter" });
    expect(within(list).getByText("basis.gbs")).toBeInTheDocument();
    // Sizes with their unit: "H 0\n" and "S 1 1.00\n" are 4 + 9 = 13 bytes.
    expect(within(list).getByText("basis.gbs").parentElement).toHaveTextContent("13 bytes");
    await waitFor(() =>
      expect((previews.at(-1) as SpecBody & { extraFiles?: unknown }).extraFiles).toEqual([
        {
          stage: "scatter",
          fileName: "basis.gbs",
          contentBase64: Buffer.from("H 0\nS 1 1.00\n").toString("base64"),
        },
        { stage: "scatter", fileName: "restart.bin", contentBase64: "AP/+gAo=" },
      ]),
    );
    await user.click(within(list).getByRole("button", { name: "Remove basis.gbs" }));
    await waitFor(() =>
      expect((previews.at(-1) as SpecBody & { extraFiles?: unknown }).extraFiles).toEqual([
        { stage: "scatter", fileName: "restart.bin", contentBase64: "AP/+gAo=" },
      ]),
    );
    // Over the per-file limit: refused before anything is sent, the message tied to the picker.
    await user.upload(picker, new File([new Uint8Array(128 * 1024 + 1)], "huge.bin"));
    await waitFor(() => expect(picker).toHaveAttribute("aria-invalid", "true"));
    const errorId = picker
      .getAttribute("aria-describedby")!
      .split(" ")
      .find((id) => id.endsWith("-error"))!;
    expect(document.getElementById(errorId)).toHaveTextContent(
      "huge.bin is 131,073 bytes; at most 131,072 bytes (128 KiB) per file.",
    );
    expect(previews.some((spec) => JSON.stringify(spec).includes("huge.bin"))).toBe(false);
    // The server's refusal of a name (it collides with a rendered file) shows beside the control too.
    server.use(
      http.post("/api/groups/:groupId/runs/preview", () =>
        HttpResponse.json(
          {
            error: {
              code: "validation_failed",
              message: "The extra files do not fit the recipe.",
              details: [
                {
                  path: "spec.extraFiles.1.fileName",
                  message: "Stage scatter already has a file named input.json.",
                },
              ],
            },
          },
          { status: 422 },
        ),
      ),
    );
    await user.upload(picker, new File(["{}"], "input.json"));
    await waitFor(() =>
      expect(document.getElementById(errorId)).toHaveTextContent(
        "input.json: Stage scatter already has a file named input.json.",
      ),
    );
    expect(submissions).toHaveLength(0);
  });

  it("disables a host where a stage's code is not installed, and names it at the Host field", async () => {
    setUp();
    const devHost: Host = { ...host, id: DEV_HOST_ID, name: "dev-host", scheduler: "direct" };
    server.use(
      http.get("/api/groups/:groupId/hosts", () => HttpResponse.json({ hosts: [host, devHost] })),
      http.get("/api/codes/:codeId", () => HttpResponse.json({ ...code, hostIds: [HOST_ID] })),
    );
    const { user } = renderApp(`/groups/${KESTREL_ID}/runs/new`);
    await screen.findByRole("heading", { name: "New run" });
    const hostSelect = await screen.findByLabelText("Host");
    // Before a recipe is chosen any host will do.
    const devOption = await within(hostSelect).findByRole("option", { name: "dev-host (direct)" });
    expect(devOption).toBeEnabled();
    await user.selectOptions(hostSelect, DEV_HOST_ID);
    await user.selectOptions(screen.getByLabelText("Recipe"), RECIPE_ID);
    // The recipe's scatter stage runs radial-scatter 1.0, installed on tern only.
    await waitFor(() =>
      expect(devOption).toHaveTextContent("dev-host (direct) — stage scatter's code is not installed here"),
    );
    expect(devOption).toBeDisabled();
    expect(within(hostSelect).getByRole("option", { name: "tern (slurm)" })).toBeEnabled();
    await waitFor(() => expect(hostSelect).toHaveAttribute("aria-invalid", "true"));
    const errorId = hostSelect
      .getAttribute("aria-describedby")!
      .split(" ")
      .find((id) => id.endsWith("-error"))!;
    expect(document.getElementById(errorId)).toHaveTextContent(
      "The code of stage scatter is not installed on this host.",
    );
    await user.selectOptions(hostSelect, HOST_ID);
    await waitFor(() => expect(hostSelect).not.toHaveAttribute("aria-invalid"));
  });
});

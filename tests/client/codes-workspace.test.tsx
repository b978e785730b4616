/**
 * The Codes and recipes page against a fake codes API that follows shared/schemas/codes.ts and
 * shared/schemas/recipes.ts: registering (errors shown at the path the server names), new versions,
 * export and import of definition files, the template preview and the recipe builder.
 */
import type { Code, CodeDefinition, Recipe } from "@shared/schemas";
import { screen, waitFor, within } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { HttpResponse, http } from "msw";
import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import { codeDefinition } from "./support/code-fixtures";
import { installFakeApi } from "./support/fake-api";
import { KESTREL_ID, kestrel, people } from "./support/fixtures";
import { renderApp } from "./support/render-app";
import { server } from "./support/server";
import { TARGET_IDS, targetList } from "./support/target-fixtures";

const codesPath = `/groups/${KESTREL_ID}/codes`;
const CREATED = "2026-11-21T08:00:00.000Z";

const orbitals = codeDefinition({
  name: "orbital-scf",
  version: "2.0",
  description: "Target orbitals",
  inputTemplates: [
    { fileName: "scf.in", format: "text", template: "basis {{ basis }}\n" },
    { fileName: "geometry.xyz", format: "text", template: "{{ target.name }}\n" },
  ],
  parameters: {
    type: "object",
    properties: {
      basis: { type: "string", enum: ["cc-pVDZ", "cc-pVTZ"], default: "cc-pVDZ", description: "Basis set" },
      energyEv: { type: "number", minimum: 0, default: 1.5, unit: "eV", description: "Collision energy" },
    },
    additionalProperties: false,
  },
  outputFiles: ["orbitals.dat", "scf.log"],
  outputRules: { progress: ["^iteration (?P<done>\\d+) of (?P<total>\\d+)"], timings: [] },
  resultFiles: [{ fileName: "orbitals.dat", reader: "orbital-table" }],
});

const solver = codeDefinition({
  name: "kmatrix-solver",
  stdinFile: "solve.in",
  inputTemplates: [{ fileName: "solve.in", format: "text", template: "read orbitals.dat\n" }],
  outputFiles: ["kmatrix.dat"],
});

type FakeCodes = {
  codes: Code[];
  recipes: Recipe[];
  posted: unknown[];
  previews: unknown[];
  imports: unknown[];
};

/** Codes, recipes and previews in memory; registering checks name and version like the server. */
function installCodesApi(initial: CodeDefinition[]): FakeCodes {
  let next = 1;
  const id = () => `c0de0000-0000-4000-8000-${String(next++).padStart(12, "0")}`;
  const toCode = (d: CodeDefinition): Code => ({
    id: id(),
    groupId: KESTREL_ID,
    definition: d,
    createdAt: CREATED,
  });
  const state: FakeCodes = { codes: initial.map(toCode), recipes: [], posted: [], previews: [], imports: [] };
  server.use(
    http.get("/api/groups/:groupId/codes", () => HttpResponse.json({ codes: state.codes })),
    http.post("/api/groups/:groupId/codes", async ({ request }) => {
      const body = (await request.json()) as CodeDefinition;
      state.posted.push(body);
      const code = toCode(body);
      state.codes.push(code);
      return HttpResponse.json(code, { status: 201 });
    }),
    http.get("/api/groups/:groupId/codes/export", () =>
      HttpResponse.json({
        format: "sigmaflow-code-definitions",
        version: 1,
        codes: state.codes.map((c) => c.definition),
      }),
    ),
    http.post("/api/groups/:groupId/codes/import", async ({ request }) => {
      const body = (await request.json()) as { codes: CodeDefinition[] };
      state.imports.push(body);
      const added = body.codes.map(toCode);
      state.codes.push(...added);
      return HttpResponse.json({ codes: added }, { status: 201 });
    }),
    http.get("/api/groups/:groupId/recipes", () => HttpResponse.json({ recipes: state.recipes })),
    http.get("/api/groups/:groupId/targets", () => HttpResponse.json(targetList())),
  );
  return state;
}

function signIn() {
  installFakeApi({ me: people.tomas, groups: [{ ...kestrel, myRole: "member" }] });
}

async function openCode(name: string, version: string) {
  await userEvent.click(await screen.findByRole("button", { name: `${name} ${version}: show details` }));
  return screen.findByRole("table", { name: `Parameters of ${name} ${version}` });
}

describe("codes: the detail of a version", () => {
  it("lists parameters from the JSON Schema with type, default, unit and description, and the output rules", async () => {
    signIn();
    installCodesApi([orbitals, solver]);
    renderApp(codesPath);
    const table = await openCode("orbital-scf", "2.0");
    const energy = within(table)
      .getAllByRole("row")
      .find((row) => within(row).queryByText("energyEv"))!;
    expect(within(energy).getByText("number")).toBeInTheDocument();
    expect(within(energy).getByText("1.5")).toBeInTheDocument();
    expect(within(energy).getByText("eV")).toBeInTheDocument();
    expect(within(energy).getByText("≥ 0")).toBeInTheDocument();
    expect(within(energy).getByText("Collision energy")).toBeInTheDocument();
    const basis = within(table)
      .getAllByRole("row")
      .find((row) => within(row).queryByText("basis"))!;
    expect(within(basis).getByText("cc-pVDZ | cc-pVTZ")).toBeInTheDocument();
    expect(screen.getByText("^iteration (?P<done>\\d+) of (?P<total>\\d+)")).toBeInTheDocument();
    expect(screen.getByText("orbitals.dat (orbital-table)")).toBeInTheDocument();
  });
});

describe("codes: registering", () => {
  it("shows the server's problem at the path it names, on the line it is on, and nothing else", async () => {
    signIn();
    const state = installCodesApi([orbitals]);
    server.use(
      http.post("/api/groups/:groupId/codes", async ({ request }) => {
        state.posted.push(await request.json());
        return HttpResponse.json(
          {
            error: {
              code: "invalid_code_definition",
              message:
                "The code definition cannot be used: inputTemplates.0.template: input.txt, line 1: expected variable end",
              details: [
                { path: "inputTemplates.0.template", message: "input.txt, line 1: expected variable end" },
              ],
            },
          },
          { status: 422 },
        );
      }),
    );
    renderApp(codesPath);
    await userEvent.click(await screen.findByRole("button", { name: "Register a code" }));
    const editor = screen.getByRole("textbox", { name: "Definition (JSON)" });
    await userEvent.click(screen.getByRole("button", { name: "Register code" }));

    const list = await screen.findByRole("list", { name: "Problems by path" });
    const items = within(list).getAllByRole("listitem");
    expect(items).toHaveLength(1);
    expect(items[0]).toHaveTextContent("inputTemplates.0.template input.txt, line 1: expected variable end");
    // The line of "template" in the first input file of the pretty-printed blank definition.
    const text = (editor as HTMLTextAreaElement).value;
    const expectedLine = text.split("\n").findIndex((line) => line.includes('"template": ')) + 1;
    expect(within(items[0]!).getByRole("button", { name: `line ${expectedLine}` })).toBeInTheDocument();
    expect(editor).toHaveAttribute("aria-invalid", "true");
    expect(editor.getAttribute("aria-describedby")).toBeTruthy();
    expect(state.posted).toHaveLength(1);
    // Nothing was added to the list.
    expect(screen.getAllByRole("button", { name: /show details$/ })).toHaveLength(1);

    await userEvent.click(within(items[0]!).getByRole("button", { name: `line ${expectedLine}` }));
    const area = editor as HTMLTextAreaElement;
    expect(area.value.slice(area.selectionStart, area.selectionEnd)).toContain('"template": ');
  });

  it("checks the contract before sending: a bad version is named and nothing is posted", async () => {
    signIn();
    const state = installCodesApi([]);
    renderApp(codesPath);
    await userEvent.click(await screen.findByRole("button", { name: "Register a code" }));
    const editor = screen.getByRole("textbox", { name: "Definition (JSON)" }) as HTMLTextAreaElement;
    const bad = JSON.parse(editor.value);
    bad.version = "1 0";
    await userEvent.clear(editor);
    await userEvent.click(editor);
    await userEvent.paste(JSON.stringify(bad, null, 2));
    await userEvent.click(screen.getByRole("button", { name: "Register code" }));
    const items = within(await screen.findByRole("list", { name: "Problems by path" })).getAllByRole(
      "listitem",
    );
    expect(items).toHaveLength(1);
    expect(items[0]).toHaveTextContent(/^version Use letters, digits/);
    expect(state.posted).toHaveLength(0);
  });

  it("registers a new version from an old one, leaving the old version as it was", async () => {
    signIn();
    const state = installCodesApi([orbitals]);
    renderApp(codesPath);
    await openCode("orbital-scf", "2.0");
    await userEvent.click(screen.getByRole("button", { name: "New version" }));
    const editor = screen.getByRole("textbox", { name: "Definition (JSON)" }) as HTMLTextAreaElement;
    expect(JSON.parse(editor.value)).toEqual({ ...orbitals, version: "2.1" });
    await userEvent.click(screen.getByRole("button", { name: "Register this version" }));
    await screen.findByRole("table", { name: "Parameters of orbital-scf 2.1" });
    expect(state.posted).toEqual([{ ...orbitals, version: "2.1" }]);
    expect(state.codes.map((c) => c.definition.version)).toEqual(["2.0", "2.1"]);
    expect(state.codes[0]!.definition).toEqual(orbitals);
  });
});

describe("codes: export and import", () => {
  let saved: Blob[] = [];
  beforeEach(() => {
    saved = [];
    vi.spyOn(URL, "createObjectURL").mockImplementation((blob) => {
      saved.push(blob as Blob);
      return "blob:sigmaflow-test";
    });
    vi.spyOn(URL, "revokeObjectURL").mockImplementation(() => undefined);
    vi.spyOn(HTMLAnchorElement.prototype, "click").mockImplementation(() => undefined);
  });
  afterEach(() => vi.restoreAllMocks());

  it("exports the group's definitions to a file that imports back unchanged", async () => {
    signIn();
    const state = installCodesApi([orbitals, solver]);
    renderApp(codesPath);
    await userEvent.click(await screen.findByRole("button", { name: "Export all" }));
    await waitFor(() => expect(saved).toHaveLength(1));
    const text = await saved[0]!.text();
    expect(JSON.parse(text)).toEqual({
      format: "sigmaflow-code-definitions",
      version: 1,
      codes: [orbitals, solver],
    });

    const file = new File([text], "sigmaflow-codes.json", { type: "application/json" });
    await userEvent.upload(screen.getByLabelText("Import file…"), file);
    expect(await screen.findByText(/Imported 2 definitions from sigmaflow-codes.json/)).toBeInTheDocument();
    expect(state.imports).toEqual([
      { format: "sigmaflow-code-definitions", version: 1, codes: [orbitals, solver] },
    ]);
  });

  it("imports a file holding one bare definition as a document of one", async () => {
    signIn();
    const state = installCodesApi([orbitals]);
    renderApp(codesPath);
    const file = new File([JSON.stringify(solver)], "kmatrix-solver.json", { type: "application/json" });
    await userEvent.upload(await screen.findByLabelText("Import file…"), file);
    expect(await screen.findByText(/Imported 1 definition from kmatrix-solver.json/)).toBeInTheDocument();
    expect(state.imports).toEqual([{ format: "sigmaflow-code-definitions", version: 1, codes: [solver] }]);
  });

  it("refuses a file that is not an export document, naming the path, and sends nothing", async () => {
    signIn();
    const state = installCodesApi([orbitals]);
    renderApp(codesPath);
    const document = {
      format: "sigmaflow-code-definitions",
      version: 1,
      codes: [{ ...solver, executable: "rm -rf /" }],
    };
    const file = new File([JSON.stringify(document)], "bad.json", { type: "application/json" });
    await userEvent.upload(await screen.findByLabelText("Import file…"), file);
    const list = await screen.findByRole("list", { name: "Import problems by path" });
    expect(within(list).getAllByRole("listitem")).toHaveLength(1);
    expect(within(list).getByText("codes.0.executable")).toBeInTheDocument();
    expect(state.imports).toHaveLength(0);
  });
});

describe("codes: template preview", () => {
  it("renders the files for the chosen target with the defaults filled in, one tab per file", async () => {
    signIn();
    installCodesApi([orbitals]);
    const bodies: unknown[] = [];
    server.use(
      http.post("/api/codes/:codeId/preview", async ({ request }) => {
        bodies.push(await request.json());
        return HttpResponse.json({
          parameters: { basis: "cc-pVTZ", energyEv: 1.5 },
          target: { id: TARGET_IDS.water, name: "Water", version: 2 },
          files: [
            { fileName: "scf.in", sizeBytes: 14, text: "basis cc-pVTZ\n", truncated: false },
            { fileName: "geometry.xyz", sizeBytes: 6, text: "Water\n", truncated: false },
          ],
          arguments: [],
        });
      }),
    );
    renderApp(codesPath);
    await openCode("orbital-scf", "2.0");
    expect(screen.getByLabelText("energyEv (eV)")).toHaveValue("1.5");
    expect(screen.getByLabelText("basis")).toHaveValue("cc-pVDZ");
    await userEvent.selectOptions(await screen.findByLabelText("Target"), TARGET_IDS.water);
    await userEvent.selectOptions(screen.getByLabelText("basis"), "cc-pVTZ");
    await userEvent.click(screen.getByRole("button", { name: "Render input files" }));

    const tabs = await screen.findByRole("tablist", { name: "Rendered input files" });
    expect(
      within(tabs)
        .getAllByRole("tab")
        .map((t) => t.textContent),
    ).toEqual(["scf.in", "geometry.xyz"]);
    expect(bodies).toEqual([{ targetId: TARGET_IDS.water, parameters: { basis: "cc-pVTZ", energyEv: 1.5 } }]);
    expect(screen.getByRole("tabpanel")).toHaveTextContent("basis cc-pVTZ");
    await userEvent.click(within(tabs).getByRole("tab", { name: "geometry.xyz" }));
    expect(screen.getByRole("tabpanel")).toHaveTextContent("Water");
    expect(screen.getByRole("tabpanel")).not.toHaveTextContent("basis cc-pVTZ");
    expect(screen.getByText(/Rendered for Water v2/)).toBeInTheDocument();
  });

  it("shows a refused parameter at its field", async () => {
    signIn();
    installCodesApi([orbitals]);
    server.use(
      http.post("/api/codes/:codeId/preview", () =>
        HttpResponse.json(
          {
            error: {
              code: "invalid_parameters",
              message: "The parameters do not fit orbital-scf 2.0: parameters.energyEv must be >= 0.",
              details: [{ path: "parameters.energyEv", message: "must be >= 0" }],
            },
          },
          { status: 422 },
        ),
      ),
    );
    renderApp(codesPath);
    await openCode("orbital-scf", "2.0");
    const energy = screen.getByLabelText("energyEv (eV)");
    await userEvent.clear(energy);
    await userEvent.type(energy, "-2");
    await userEvent.click(screen.getByRole("button", { name: "Render input files" }));
    await waitFor(() => expect(energy).toHaveAttribute("aria-invalid", "true"));
    expect(energy).toHaveAccessibleDescription(/must be >= 0/);
    expect(screen.getByLabelText("basis")).not.toHaveAttribute("aria-invalid");
  });
});

describe("recipes: the builder", () => {
  it("chains stages, shows the files each hands to the next, reorders and creates in order", async () => {
    signIn();
    const state = installCodesApi([orbitals, solver]);
    const bodies: unknown[] = [];
    server.use(
      http.post("/api/groups/:groupId/recipes", async ({ request }) => {
        const body = (await request.json()) as { name: string; stages: { name: string; codeId: string }[] };
        bodies.push(body);
        const recipe: Recipe = {
          id: "2ec10000-0000-4000-8000-000000000001",
          groupId: KESTREL_ID,
          name: body.name,
          description: "",
          stages: body.stages.map((s) => {
            const code = state.codes.find((c) => c.id === s.codeId)!;
            return { ...s, codeName: code.definition.name, codeVersion: code.definition.version };
          }),
          createdAt: CREATED,
        };
        state.recipes.push(recipe);
        return HttpResponse.json(recipe, { status: 201 });
      }),
    );
    renderApp(codesPath);
    await userEvent.click(await screen.findByRole("button", { name: "New recipe" }));
    await userEvent.type(screen.getByLabelText("Recipe name"), "orbitals-then-kmatrix");
    await userEvent.click(screen.getByRole("button", { name: "Add stage" }));
    const [scfId, solverId] = state.codes.map((c) => c.id);
    // Built in the wrong order first, then moved.
    await userEvent.selectOptions(screen.getByLabelText("Stage 1 code"), solverId!);
    await userEvent.selectOptions(screen.getByLabelText("Stage 2 code"), scfId!);
    await userEvent.clear(screen.getByLabelText("Stage 1 name"));
    await userEvent.type(screen.getByLabelText("Stage 1 name"), "solve");
    await userEvent.clear(screen.getByLabelText("Stage 2 name"));
    await userEvent.type(screen.getByLabelText("Stage 2 name"), "orbitals");
    await userEvent.click(screen.getByRole("button", { name: "Move stage 2 up" }));

    const chain = screen.getByRole("list", { name: "Stages of the new recipe" });
    const link = within(chain).getByRole("listitem", { name: "From stage 1 to stage 2" });
    expect(link).toHaveTextContent("orbitals.dat");
    expect(link).toHaveTextContent("scf.log");
    // The solver's input names orbitals.dat; scf.log it never mentions.
    const files = within(link).getAllByRole("listitem");
    expect(files.find((f) => f.textContent?.startsWith("orbitals.dat"))).toHaveTextContent("read");
    expect(files.find((f) => f.textContent?.startsWith("scf.log"))).not.toHaveTextContent("read");

    await userEvent.click(screen.getByRole("button", { name: "Create recipe" }));
    await screen.findByRole("list", { name: "Stages of orbitals-then-kmatrix" });
    expect(bodies).toEqual([
      {
        name: "orbitals-then-kmatrix",
        description: "",
        stages: [
          { name: "orbitals", codeId: scfId },
          { name: "solve", codeId: solverId },
        ],
      },
    ]);
  });

  it("copies a saved recipe into the builder, stages and codes included", async () => {
    signIn();
    const state = installCodesApi([orbitals, solver]);
    const [scfId, solverId] = state.codes.map((c) => c.id);
    state.recipes.push({
      id: "2ec10000-0000-4000-8000-000000000002",
      groupId: KESTREL_ID,
      name: "orbitals-to-kmatrix",
      description: "Orbitals, then K-matrices",
      stages: [
        { name: "orbitals", codeId: scfId!, codeName: "orbital-scf", codeVersion: "2.0" },
        { name: "solve", codeId: solverId!, codeName: "kmatrix-solver", codeVersion: "1.0" },
      ],
      createdAt: CREATED,
    });
    renderApp(codesPath);
    const saved = await screen.findByRole("list", { name: "Stages of orbitals-to-kmatrix" });
    expect(within(saved).getByRole("listitem", { name: "From stage 1 to stage 2" })).toHaveTextContent(
      "orbitals.dat",
    );
    await userEvent.click(screen.getByRole("button", { name: "Copy orbitals-to-kmatrix into a new recipe" }));
    expect(screen.getByLabelText("Recipe name")).toHaveValue("orbitals-to-kmatrix-copy");
    expect(screen.getByLabelText("Stage 1 name")).toHaveValue("orbitals");
    expect(screen.getByLabelText("Stage 2 code")).toHaveValue(solverId);
    await userEvent.click(screen.getByRole("button", { name: "Remove stage 2" }));
    expect(screen.queryByLabelText("Stage 2 code")).not.toBeInTheDocument();
    expect(screen.getByRole("list", { name: "Stages of the new recipe" })).not.toHaveTextContent(
      "orbitals.dat",
    );
  });
});

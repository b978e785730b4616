/**
 * Retired code versions on the Codes and recipes page, against a fake codes API that follows
 * shared/schemas/codes.ts: the "retired" badge and order in the codes table, the Retire (with a
 * confirmation) and Bring back buttons on a version's detail, and the recipe builder leaving retired
 * versions out.
 */
import type { Code } from "@shared/schemas";
import { screen, waitFor, within } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { HttpResponse, http } from "msw";
import { describe, expect, it } from "vitest";
import { codeDefinition } from "./support/code-fixtures";
import { installFakeApi } from "./support/fake-api";
import { KESTREL_ID, kestrel, people } from "./support/fixtures";
import { renderApp } from "./support/render-app";
import { server } from "./support/server";
import { targetList } from "./support/target-fixtures";

const codesPath = `/groups/${KESTREL_ID}/codes`;
const CREATED = "2026-11-21T08:00:00.000Z";
const RETIRED = "2026-11-28T10:00:00.000Z";

const ids = {
  old: "c0de0000-0000-4000-8000-000000000001",
  current: "c0de0000-0000-4000-8000-000000000002",
  scatter: "c0de0000-0000-4000-8000-000000000003",
};

/** hf-orbitals 1.0 (retired), hf-orbitals 1.1 and radial-scatter 0.3, in the API's order by name. */
function installCodesApi() {
  const codes: Code[] = [
    {
      id: ids.old,
      groupId: KESTREL_ID,
      definition: codeDefinition({ name: "hf-orbitals", version: "1.0" }),
      createdAt: CREATED,
    },
    {
      id: ids.current,
      groupId: KESTREL_ID,
      definition: codeDefinition({ name: "hf-orbitals", version: "1.1" }),
      createdAt: CREATED,
      retiredAt: null,
    },
    {
      id: ids.scatter,
      groupId: KESTREL_ID,
      definition: codeDefinition({ name: "radial-scatter", version: "0.3" }),
      createdAt: CREATED,
      retiredAt: null,
    },
  ];
  codes[0]!.retiredAt = RETIRED;
  const patches: { codeId: string; body: unknown }[] = [];
  server.use(
    http.get("/api/groups/:groupId/codes", () => HttpResponse.json({ codes })),
    http.patch("/api/codes/:codeId", async ({ params, request }) => {
      const body = (await request.json()) as { retired: boolean };
      patches.push({ codeId: String(params.codeId), body });
      const code = codes.find((c) => c.id === params.codeId)!;
      code.retiredAt = body.retired ? RETIRED : null;
      return HttpResponse.json(code);
    }),
    http.get("/api/groups/:groupId/recipes", () => HttpResponse.json({ recipes: [] })),
    http.get("/api/groups/:groupId/targets", () => HttpResponse.json(targetList())),
  );
  return { codes, patches };
}

function signIn(role: "member" | "collaborator" = "member") {
  const me = {
    ...people.tomas,
    memberships: people.tomas.memberships.map((m) => (m.groupId === KESTREL_ID ? { ...m, role } : m)),
  };
  installFakeApi({ me, groups: [{ ...kestrel, myRole: role }] });
}

const versionCells = (table: HTMLElement) =>
  within(table)
    .getAllByRole("row")
    .slice(1)
    .map((row) => within(row).getAllByRole("cell")[1]!.textContent);

describe("codes: retired versions", () => {
  it("lists retired versions after active ones, badged and greyed", async () => {
    signIn();
    installCodesApi();
    renderApp(codesPath);
    const table = await screen.findByRole("table", { name: /^Codes of / });
    await waitFor(() => expect(versionCells(table)).toEqual(["1.1", "0.3", "1.0retired"]));
    const retiredRow = within(table).getAllByRole("row")[3]!;
    expect(within(retiredRow).getByText("retired")).toBeInTheDocument();
    expect(retiredRow.className).toMatch(/text-ink-400/);
    const activeRow = within(table).getAllByRole("row")[1]!;
    expect(within(activeRow).queryByText("retired")).toBeNull();
  });

  it("retires a version after confirmation and brings it back", async () => {
    signIn();
    const { patches } = installCodesApi();
    renderApp(codesPath);
    await userEvent.click(await screen.findByRole("button", { name: "hf-orbitals 1.1: show details" }));
    await userEvent.click(await screen.findByRole("button", { name: "Retire version" }));
    const dialog = await screen.findByRole("dialog", { name: "Retire hf-orbitals 1.1?" });
    expect(patches).toEqual([]);
    await userEvent.click(within(dialog).getByRole("button", { name: "Retire version" }));
    await waitFor(() => expect(patches).toEqual([{ codeId: ids.current, body: { retired: true } }]));
    expect(await screen.findByRole("button", { name: "Bring back" })).toBeInTheDocument();
    expect(screen.getByRole("status")).toHaveTextContent(/Retired .*new recipes and runs cannot use/);

    await userEvent.click(screen.getByRole("button", { name: "Bring back" }));
    await waitFor(() => expect(patches).toHaveLength(2));
    expect(patches[1]).toEqual({ codeId: ids.current, body: { retired: false } });
    expect(await screen.findByRole("button", { name: "Retire version" })).toBeInTheDocument();
  });

  it("offers neither button to a collaborator", async () => {
    signIn("collaborator");
    installCodesApi();
    renderApp(codesPath);
    await userEvent.click(await screen.findByRole("button", { name: "hf-orbitals 1.0: show details" }));
    await screen.findByRole("table", { name: "Parameters of hf-orbitals 1.0" });
    expect(screen.queryByRole("button", { name: "Bring back" })).toBeNull();
    expect(screen.queryByRole("button", { name: "Retire version" })).toBeNull();
  });

  it("leaves retired versions out of the recipe builder's choices", async () => {
    signIn();
    installCodesApi();
    renderApp(codesPath);
    await userEvent.click(await screen.findByRole("button", { name: "New recipe" }));
    const select = await screen.findByLabelText("Stage 1 code");
    const options = within(select)
      .getAllByRole("option")
      .map((o) => o.textContent);
    expect(options).toEqual(["Choose a code…", "hf-orbitals 1.1", "radial-scatter 0.3"]);
  });
});

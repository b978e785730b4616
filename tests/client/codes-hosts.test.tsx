/**
 * Where code versions are installed, on the Codes and recipes page, against a fake codes API that
 * follows shared/schemas/codes.ts: the table's Hosts column ("Any host" for a version not pinned), the
 * "Installed on" ticks of a version's detail saved with PATCH /api/codes/:codeId { hostIds }, the
 * server's refusal beside them, and a collaborator reading them without Save.
 */
import type { Code } from "@shared/schemas";
import { screen, waitFor, within } from "@testing-library/react";
import { HttpResponse, http } from "msw";
import { describe, expect, it } from "vitest";
import { codeDefinition, hostFixture } from "./support/code-fixtures";
import { apiError, installFakeApi } from "./support/fake-api";
import { KESTREL_ID, kestrel, people } from "./support/fixtures";
import { renderApp } from "./support/render-app";
import { server } from "./support/server";
import { targetList } from "./support/target-fixtures";

const codesPath = `/groups/${KESTREL_ID}/codes`;
const CREATED = "2026-11-21T08:00:00.000Z";

const ids = {
  orbitals: "c0de0000-0000-4000-8000-000000000011",
  scatter: "c0de0000-0000-4000-8000-000000000012",
  tern: "4057aaaa-0000-4000-8000-000000000001",
  petrel: "4057aaaa-0000-4000-8000-000000000002",
};

/** hf-orbitals 1.1 (not pinned) and radial-scatter 0.3 (installed on petrel); hosts tern and petrel. */
function installCodesApi(role: "member" | "collaborator" = "member") {
  const me = {
    ...people.tomas,
    memberships: people.tomas.memberships.map((m) => (m.groupId === KESTREL_ID ? { ...m, role } : m)),
  };
  installFakeApi({
    me,
    groups: [{ ...kestrel, myRole: role }],
    hosts: {
      [KESTREL_ID]: [hostFixture(ids.tern, "tern", "slurm"), hostFixture(ids.petrel, "petrel", "direct")],
    },
  });
  const codes: Code[] = [
    {
      id: ids.orbitals,
      groupId: KESTREL_ID,
      definition: codeDefinition({ name: "hf-orbitals", version: "1.1" }),
      createdAt: CREATED,
      retiredAt: null,
      hostIds: [],
    },
    {
      id: ids.scatter,
      groupId: KESTREL_ID,
      definition: codeDefinition({ name: "radial-scatter", version: "0.3" }),
      createdAt: CREATED,
      retiredAt: null,
      hostIds: [ids.petrel],
    },
  ];
  const patches: { codeId: string; body: unknown }[] = [];
  server.use(
    http.get("/api/groups/:groupId/codes", () => HttpResponse.json({ codes })),
    http.patch("/api/codes/:codeId", async ({ params, request }) => {
      const body = (await request.json()) as { hostIds: string[] };
      patches.push({ codeId: String(params.codeId), body });
      const code = codes.find((c) => c.id === params.codeId)!;
      code.hostIds = body.hostIds;
      return HttpResponse.json(code);
    }),
    http.get("/api/groups/:groupId/recipes", () => HttpResponse.json({ recipes: [] })),
    http.get("/api/groups/:groupId/targets", () => HttpResponse.json(targetList())),
  );
  return { codes, patches };
}

/** The Hosts cell of the row of `name`. */
async function hostsCell(name: string) {
  const table = await screen.findByRole("table", { name: /^Codes of / });
  const headers = within(table)
    .getAllByRole("columnheader")
    .map((cell) => cell.textContent);
  const column = headers.indexOf("Hosts");
  expect(column).toBeGreaterThan(-1);
  const row = within(table)
    .getAllByRole("row")
    .find((candidate) => within(candidate).queryByText(name))!;
  return within(row).getAllByRole("cell")[column]!;
}

describe("codes: hosts a version is installed on", () => {
  it("shows Any host for a version not pinned and the host's name for a pinned one", async () => {
    installCodesApi();
    renderApp(codesPath);
    expect(await hostsCell("hf-orbitals")).toHaveTextContent(/^Any host$/);
    await waitFor(async () => expect(await hostsCell("radial-scatter")).toHaveTextContent(/^petrel$/));
  });

  it("saves the ticked hosts with PATCH { hostIds } and the table then names them", async () => {
    const { patches } = installCodesApi();
    const { user } = renderApp(codesPath);
    await user.click(await screen.findByRole("button", { name: "hf-orbitals 1.1: show details" }));
    const installedOn = await screen.findByRole("group", { name: "Installed on" });
    expect(installedOn).toHaveTextContent("None ticked: any of the group's hosts may run this version.");
    const tern = await within(installedOn).findByRole("checkbox", { name: "tern (slurm)" });
    expect(tern).not.toBeChecked();
    expect(within(installedOn).getByRole("checkbox", { name: "petrel (direct)" })).not.toBeChecked();
    await user.click(tern);
    expect(tern).toBeChecked();
    expect(patches).toEqual([]);
    await user.click(within(installedOn).getByRole("button", { name: /^Save/ }));
    await waitFor(() => expect(patches).toEqual([{ codeId: ids.orbitals, body: { hostIds: [ids.tern] } }]));
    await waitFor(async () => expect(await hostsCell("hf-orbitals")).toHaveTextContent(/^tern$/));
  });

  it("shows the server's refusal beside the hosts", async () => {
    installCodesApi();
    server.use(
      http.patch("/api/codes/:codeId", () =>
        apiError(422, "validation_failed", "The hosts do not fit.", [
          { path: "hostIds.0", message: "No host of this group has that id." },
        ]),
      ),
    );
    const { user } = renderApp(codesPath);
    await user.click(await screen.findByRole("button", { name: "radial-scatter 0.3: show details" }));
    const installedOn = await screen.findByRole("group", { name: "Installed on" });
    expect(await within(installedOn).findByRole("checkbox", { name: "petrel (direct)" })).toBeChecked();
    await user.click(within(installedOn).getByRole("checkbox", { name: "tern (slurm)" }));
    await user.click(within(installedOn).getByRole("button", { name: /^Save/ }));
    expect(await within(installedOn).findByRole("alert")).toHaveTextContent(
      "The hosts do not fit. No host of this group has that id.",
    );
  });

  it("lets a collaborator read the hosts without Save", async () => {
    installCodesApi("collaborator");
    const { user } = renderApp(codesPath);
    await user.click(await screen.findByRole("button", { name: "radial-scatter 0.3: show details" }));
    const installedOn = await screen.findByRole("group", { name: "Installed on" });
    const petrel = await within(installedOn).findByRole("checkbox", { name: "petrel (direct)" });
    expect(petrel).toBeChecked();
    expect(petrel).toBeDisabled();
    expect(within(installedOn).getByRole("checkbox", { name: "tern (slurm)" })).toBeDisabled();
    expect(screen.queryByRole("button", { name: /^Save/ })).toBeNull();
  });
});

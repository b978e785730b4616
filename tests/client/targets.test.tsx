/**
 * The targets pages against the fake API (shared/schemas/targets.ts is the contract): the group's targets
 * with isotopologues under their parent, a target's current version with its atoms, derived properties
 * and versions, the one way to enter a target (the editor) with the server's refusal shown, and the target a
 * run names.
 */
import type { TargetDetail } from "@shared/schemas";
import { screen, within } from "@testing-library/react";
import { HttpResponse, http } from "msw";
import { describe, expect, it } from "vitest";
import { apiError, installFakeApi } from "./support/fake-api";
import { KESTREL_ID, kestrel, people } from "./support/fixtures";
import { renderApp } from "./support/render-app";
import { kestrelRuns, RUN_IDS } from "./support/run-fixtures";
import { server } from "./support/server";
import { TARGET_IDS, targetList, waterDetail } from "./support/target-fixtures";

const targetsPath = `/groups/${KESTREL_ID}/targets`;

function install(role: "member" | "collaborator" = "member") {
  const me = {
    ...people.tomas,
    memberships: people.tomas.memberships.map((m) => ({ ...m, role })),
  };
  const api = installFakeApi({
    me,
    groups: [{ ...kestrel, myRole: role }],
    runs: { [KESTREL_ID]: kestrelRuns() },
  });
  server.use(
    http.get("/api/groups/:groupId/targets", () => HttpResponse.json(targetList())),
    http.get("/api/targets/:targetId", ({ params }) =>
      params.targetId === TARGET_IDS.water
        ? HttpResponse.json(waterDetail())
        : apiError(404, "not_found", "No such target."),
    ),
  );
  return { api };
}

describe("targets", () => {
  it("lists the group's targets with each isotopologue indented under its parent", async () => {
    install();
    renderApp(targetsPath);
    const table = await screen.findByRole("table", { name: `Targets of ${kestrel.name}` });
    const rows = within(table).getAllByRole("row").slice(1);
    expect(rows.map((row) => within(row).getAllByRole("cell")[0]!.textContent)).toEqual([
      "Water",
      "↳Heavy waterisotopologue of Water",
      "Nitrogen trifluoride",
    ]);
    expect(
      within(rows[0]!)
        .getAllByRole("cell")
        .map((cell) => cell.textContent),
    ).toEqual(["Water", "H2O", "C2v", "2", "3"]);
    // The point group and, where it differs, the Abelian subgroup the codes work in.
    expect(within(rows[2]!).getByText("C3v / Cs")).toBeInTheDocument();
  });

  it("opens a target's current version: atoms, derived properties and versions", async () => {
    install();
    const { user, router } = renderApp(targetsPath);
    await user.click(await screen.findByRole("link", { name: "Water" }));
    expect(await screen.findByRole("heading", { level: 1, name: "Water" })).toBeInTheDocument();
    expect(router.state.location.pathname).toBe(`${targetsPath}/${TARGET_IDS.water}`);

    const atoms = screen.getByRole("table", { name: "Atoms of Water, version 2" });
    expect(within(atoms).getAllByRole("row")[2]!.textContent).toBe(
      "2H1 (most common)0.7572200.0000000.586514",
    );
    const properties = screen.getByRole("heading", { name: "Version 2" }).closest("section") as HTMLElement;
    expect(within(properties).getByText("Rotational constants A, B, C (cm⁻¹)").nextSibling).toHaveTextContent(
      "27.44, 14.59, 9.525",
    );
    expect(within(properties).getByText("Rotational constants A, B, C (MHz)").nextSibling).toHaveTextContent(
      "822600, 437400, 285600",
    );
    expect(within(properties).getByText("Nuclear repulsion (Eₕ)").nextSibling).toHaveTextContent("9.1882");
    expect(within(properties).getByText("Rotor type").nextSibling).toHaveTextContent("asymmetric top");
    expect(within(properties).getByText("Electrons").nextSibling).toHaveTextContent("10");
    expect(within(properties).queryByText(/Dipole/)).not.toBeInTheDocument();

    const versions = screen.getByRole("table", { name: "Versions of Water" });
    expect(within(versions).getByText("2 (current)")).toBeInTheDocument();
    expect(within(versions).getByText("Noor Vasquez")).toBeInTheDocument();
    expect(screen.getByRole("link", { name: "Heavy water" })).toHaveAttribute(
      "href",
      `${targetsPath}/${TARGET_IDS.heavyWater}`,
    );
  });

  it("sends the editor's atoms with the CSRF token and shows the server's refusal", async () => {
    install();
    const posts: { body: unknown; csrf: string | null }[] = [];
    server.use(
      http.post("/api/groups/:groupId/targets", async ({ request }) => {
        posts.push({ body: await request.json(), csrf: request.headers.get("x-csrf-token") });
        // The server's answer to a name the group already uses (server/services/targets.service.ts).
        return apiError(
          409,
          "conflict",
          'This group already has a target named "Water"; choose another name.',
          {
            path: "name",
          },
        );
      }),
    );
    const { user } = renderApp(targetsPath);
    const form = await screen.findByRole("form", { name: "New target" });
    // One way in: the editor; the page has no second form asking for an XYZ file.
    expect(screen.getAllByLabelText("XYZ file")).toHaveLength(1);
    await user.type(within(form).getByLabelText("Name"), "Water");
    await user.type(within(form).getByLabelText("XYZ text"), "1{Enter}helium{Enter}He 0 0 0");
    await user.click(within(form).getByRole("button", { name: "Read into the table" }));
    expect(within(form).getByLabelText("Atom 1 element")).toHaveValue("He");
    await user.click(within(form).getByRole("button", { name: "Save target" }));

    expect(await within(form).findByText(/already has a target named "Water"/)).toBeInTheDocument();
    expect(posts).toHaveLength(1);
    expect(posts[0]!.csrf).toBe(people.tomas.csrfToken);
    expect(posts[0]!.body).toMatchObject({
      name: "Water",
      charge: 0,
      atoms: [{ symbol: "He", xAngstrom: 0, yAngstrom: 0, zAngstrom: 0 }],
    });
  });

  it("checks the name before sending and opens the target entered", async () => {
    install();
    let created: TargetDetail | null = null;
    server.use(
      http.post("/api/groups/:groupId/targets", () => {
        created = waterDetail();
        return HttpResponse.json(created, { status: 201 });
      }),
    );
    const { user } = renderApp(targetsPath);
    const form = await screen.findByRole("form", { name: "New target" });
    await user.type(within(form).getByLabelText("XYZ text"), "1{Enter}{Enter}He 0 0 0");
    await user.click(within(form).getByRole("button", { name: "Read into the table" }));
    await user.click(within(form).getByRole("button", { name: "Save target" }));
    expect(within(form).getByLabelText("Name")).toHaveAccessibleDescription(/name/i);
    expect(created).toBeNull();

    await user.type(within(form).getByLabelText("Name"), "Water");
    await user.click(within(form).getByRole("button", { name: "Save target" }));
    expect(await screen.findByRole("heading", { level: 1, name: "Water" })).toBeInTheDocument();
    expect(created).not.toBeNull();
  });

  it("gives collaborators the list without the form", async () => {
    install("collaborator");
    renderApp(targetsPath);
    await screen.findByRole("table", { name: `Targets of ${kestrel.name}` });
    expect(screen.queryByRole("form", { name: "New target" })).not.toBeInTheDocument();
  });

  it("names a run's target and version with a link to it", async () => {
    const { api } = install();
    const done = api.state.runs[KESTREL_ID]!.find((run) => run.id === RUN_IDS.done)!;
    Object.assign(done, { targetId: TARGET_IDS.water, targetName: "Water", targetVersion: 1 });
    server.use(
      http.get("/api/runs/:runId/results", ({ params }) =>
        HttpResponse.json({ runId: params.runId, state: "none", message: null, caution: "", results: [] }),
      ),
    );
    const { user } = renderApp(`/groups/${KESTREL_ID}/runs`);
    const table = await screen.findByRole("table", { name: `Runs of ${kestrel.name}` });
    const row = within(table).getByRole("row", { name: /HNCO elastic/ });
    expect(within(row).getByRole("link", { name: "Water, version 1" })).toHaveAttribute(
      "href",
      `${targetsPath}/${TARGET_IDS.water}`,
    );

    await user.click(within(row).getByRole("link", { name: "HNCO elastic, 0.1–10 eV" }));
    await screen.findByRole("heading", { level: 1, name: "HNCO elastic, 0.1–10 eV" });
    await user.click(screen.getByRole("link", { name: "Water, version 1" }));
    expect(await screen.findByRole("heading", { level: 1, name: "Water" })).toBeInTheDocument();
  });
});

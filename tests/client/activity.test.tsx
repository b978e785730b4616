import type { AuditEntry } from "@shared/schemas";
import { screen, within } from "@testing-library/react";
import { HttpResponse, http } from "msw";
import { describe, expect, it } from "vitest";
import { installFakeApi } from "./support/fake-api";
import { KESTREL_ID, people, USER_IDS } from "./support/fixtures";
import { renderApp } from "./support/render-app";
import { server } from "./support/server";

const HOST_ID = "40570000-0000-4000-8000-000000000001";
const RUN_ID = "5a1e0000-0000-4000-8000-0000000000aa";
const RECIPE_ID = "7ec10000-0000-4000-8000-000000000001";

function entry(
  id: number,
  fields: Partial<AuditEntry> & Pick<AuditEntry, "action" | "targetType">,
): AuditEntry {
  return {
    id,
    at: "2026-11-30T10:00:00.000Z",
    actor: "Noor Vasquez",
    targetId: null,
    targetName: null,
    targetExists: false,
    details: {},
    ...fields,
  };
}

// Contract (shared/schemas/audit.ts auditEntrySchema): names resolved by the server, ids kept for links.
const entries: AuditEntry[] = [
  entry(5, {
    action: "host.host_key_confirm",
    targetType: "host",
    targetId: HOST_ID,
    targetName: "kestrel-dev",
    targetExists: true,
  }),
  entry(4, {
    action: "run.cancel",
    actor: "Tomás Brandt",
    targetType: "run",
    targetId: RUN_ID,
    targetName: "H2O cc-pVDZ",
    targetExists: true,
  }),
  entry(3, {
    action: "member.role_change",
    targetType: "user",
    targetId: USER_IDS.tomas,
    targetName: "Tomás Brandt",
    targetExists: true,
    details: { from: "collaborator", to: "member" },
  }),
  entry(2, {
    action: "recipe.delete",
    targetType: "recipe",
    targetId: RECIPE_ID,
    targetName: "h2o-elastic",
    details: { name: "h2o-elastic" },
  }),
  entry(1, {
    action: "host.key_mismatch",
    actor: null,
    targetType: "host",
    targetId: HOST_ID,
    targetName: "kestrel-dev",
    targetExists: true,
  }),
];

describe("activity page", () => {
  it("tells each change as a sentence with names, linking to the pages of targets that have one", async () => {
    installFakeApi({ me: people.noor });
    server.use(http.get("/api/groups/:groupId/audit", () => HttpResponse.json({ entries })));
    renderApp(`/groups/${KESTREL_ID}/activity`);

    const table = await screen.findByRole("table", { name: "Group activity" });
    const rows = within(table).getAllByRole("row").slice(1);
    expect(rows.map((row) => row.lastElementChild?.textContent)).toEqual([
      "Noor Vasquez confirmed the host key of kestrel-dev",
      "Tomás Brandt asked to cancel the run H2O cc-pVDZ",
      "Noor Vasquez changed the role of Tomás Brandt from collaborator to member",
      "Noor Vasquez deleted the recipe h2o-elastic",
      "Sigmaflow found a changed host key on kestrel-dev and held its runs",
    ]);

    expect(within(rows[1]!).getByRole("link", { name: "H2O cc-pVDZ" })).toHaveAttribute(
      "href",
      `/groups/${KESTREL_ID}/runs/${RUN_ID}`,
    );
    expect(within(rows[2]!).getByRole("link", { name: "Tomás Brandt" })).toHaveAttribute(
      "href",
      `/groups/${KESTREL_ID}/members`,
    );
    // Hosts have no page of their own, and a deleted recipe has none any more.
    expect(within(rows[0]!).queryByRole("link")).not.toBeInTheDocument();
    expect(within(rows[3]!).queryByRole("link")).not.toBeInTheDocument();
    // No raw ids or action codes on the page.
    expect(table).not.toHaveTextContent(HOST_ID);
    expect(table).not.toHaveTextContent("host_key_confirm");
  });
});

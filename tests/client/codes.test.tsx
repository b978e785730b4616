/**
 * The Codes page against the fake API (shared/schemas/codes.ts is the contract).
 *
 * Regression: the page said "No codes connected yet" while the group had ten codes — it was a static
 * placeholder that never asked `GET /api/groups/:groupId/codes`. It now lists what that answers.
 */
import { screen, within } from "@testing-library/react";
import { HttpResponse, http } from "msw";
import { describe, expect, it } from "vitest";
import { installFakeApi } from "./support/fake-api";
import { KESTREL_ID, kestrel, people } from "./support/fixtures";
import { renderApp } from "./support/render-app";
import { server } from "./support/server";

const codesPath = `/groups/${KESTREL_ID}/codes`;

/** Ten registered codes: five programs in two versions each, as the API lists them (by name). */
function tenCodes() {
  const names = ["inner-region", "outer-region", "scf-orbitals", "target-states", "channel-coupling"];
  return names.flatMap((name, i) =>
    ["1.0", "2.1"].map((version, j) => ({
      id: `c0de0000-0000-4000-8000-0000000000${String(i * 2 + j).padStart(2, "0")}`,
      groupId: KESTREL_ID,
      definition: {
        name,
        version,
        description: name === "outer-region" ? "R-matrix propagation and K-matrices" : "",
        executable: `/opt/kestrel-codes/bin/${name}`,
        arguments: [],
        setupLines: [],
        inputTemplates: [{ fileName: `${name}.inp`, format: "namelist", template: "&input /\n" }],
        parameters: { type: "object", properties: {} },
        outputFiles: name === "outer-region" ? ["kmatrix.dat", "eigenphases.dat"] : [],
        outputRules: { progress: [], timings: [] },
        defaults: { cores: 16, wallTimeMinutes: 120 },
      },
      createdAt: "2025-02-03T10:00:00.000Z",
    })),
  );
}

function serveCodes(codes: unknown[]) {
  const seen: string[] = [];
  server.use(
    http.get("/api/groups/:groupId/codes", ({ params }) => {
      seen.push(String(params.groupId));
      return HttpResponse.json({ codes });
    }),
  );
  return seen;
}

describe("codes page", () => {
  it("lists the group's codes from the API instead of saying there are none", async () => {
    installFakeApi({ me: people.tomas, groups: [{ ...kestrel, myRole: "member" }] });
    const seen = serveCodes(tenCodes());
    renderApp(codesPath);

    const table = await screen.findByRole("table", { name: `Codes of ${kestrel.name}` });
    // Ten codes and the header row.
    expect(within(table).getAllByRole("row")).toHaveLength(11);
    expect(screen.queryByText("No codes connected yet")).not.toBeInTheDocument();
    expect(screen.queryByText("No codes registered yet")).not.toBeInTheDocument();
    expect(seen).toEqual([KESTREL_ID]);

    const outer = within(table)
      .getAllByRole("row")
      .filter((row) => within(row).queryByText("outer-region"));
    expect(outer).toHaveLength(2);
    expect(within(outer[1]!).getByText("2.1")).toBeInTheDocument();
    expect(within(outer[1]!).getByText("R-matrix propagation and K-matrices")).toBeInTheDocument();
    expect(within(outer[1]!).getByText("kmatrix.dat, eigenphases.dat")).toBeInTheDocument();
    expect(within(outer[1]!).getByText("16 × 120 min")).toBeInTheDocument();
  });

  it("says so when the group has no codes", async () => {
    installFakeApi({ me: people.tomas, groups: [{ ...kestrel, myRole: "member" }] });
    serveCodes([]);
    renderApp(codesPath);
    expect(await screen.findByText("No codes registered yet")).toBeInTheDocument();
  });
});

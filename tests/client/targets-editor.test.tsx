/**
 * The target editor against the fake API: the panel derived in the browser follows every change (an
 * isotope changes the centre of mass, the rotational constants and the point group), field errors sit
 * beside their field and keep the form from being sent, "Recentre" moves the atoms, a new isotopologue
 * takes two clicks, and without WebGL the 3D view says so in words.
 */
import type { TargetDetail } from "@shared/schemas";
import { screen, waitFor, within } from "@testing-library/react";
import { HttpResponse, http } from "msw";
import { describe, expect, it } from "vitest";
import { installFakeApi } from "./support/fake-api";
import { KESTREL_ID, kestrel, people } from "./support/fixtures";
import { renderApp } from "./support/render-app";
import { server } from "./support/server";
import { TARGET_IDS, targetList, waterDetail } from "./support/target-fixtures";

const targetsPath = `/groups/${KESTREL_ID}/targets`;
// Water at r(OH) = 0.9578 Å, θ = 104.48° (the geometry of tests/client/support/target-fixtures.ts).
const WATER_XYZ = "3\nWater\nO 0 0 0\nH 0.757220 0 0.586514\nH -0.757220 0 0.586514";

function install() {
  installFakeApi({ me: people.tomas, groups: [{ ...kestrel, myRole: "member" }] });
  const posts: unknown[] = [];
  server.use(
    http.get("/api/groups/:groupId/targets", () => HttpResponse.json(targetList())),
    http.get("/api/targets/:targetId", () => HttpResponse.json(waterDetail())),
    http.post("/api/groups/:groupId/targets", async ({ request }) => {
      posts.push(await request.json());
      return HttpResponse.json(
        { ...waterDetail(), id: "7a260000-0000-4000-8000-000000000009" },
        { status: 201 },
      );
    }),
    http.patch("/api/targets/:targetId", async ({ request }) => {
      posts.push(await request.json());
      return HttpResponse.json(waterDetail());
    }),
    http.post("/api/targets/:targetId/isotopologues", async ({ request }) => {
      posts.push(await request.json());
      const created: TargetDetail = {
        ...waterDetail(),
        id: TARGET_IDS.heavyWater,
        parentTargetId: TARGET_IDS.water,
      };
      return HttpResponse.json(created, { status: 201 });
    }),
  );
  return { posts };
}

/** The value shown beside a label in the derived panel. */
function derivedValue(label: string): string {
  const panel = screen.getByRole("region", { name: "Derived as you type" });
  return within(panel).getByText(label).nextElementSibling?.textContent ?? "";
}

const numbers = (text: string) => text.split(",").map((part) => Number.parseFloat(part));

async function openEditorWithWater() {
  const { posts } = install();
  const { user } = renderApp(targetsPath);
  const form = await screen.findByRole("form", { name: "New target" });
  await user.click(within(form).getByLabelText("XYZ text"));
  await user.paste(WATER_XYZ);
  await user.click(within(form).getByRole("button", { name: "Read into the table" }));
  await waitFor(() => expect(derivedValue("Point group / Abelian subgroup")).toBe("C2v / C2v"));
  return { user, form, posts };
}

describe("target editor", () => {
  it("derives again when one atom's isotope changes: centre of mass, rotational constants, point group", async () => {
    const { user, form } = await openEditorWithWater();
    // Analytic: z_COM = 2·m(¹H)·0.586514 Å / M(H2O) with NIST masses = 0.06564 Å.
    expect(numbers(derivedValue("Centre of mass (Å)"))[2]).toBeCloseTo(0.06564, 4);

    const isotope = within(form).getByLabelText("Atom 2 isotope");
    // The picker shows nuclide, mass (u) and natural abundance (%) of each isotope (NIST: ²H 2.014102 u, 0.0115 %).
    expect(
      within(isotope).getByRole("option", { name: /^²H · 2\.014102 u · 0\.0115 %$/ }),
    ).toBeInTheDocument();
    await user.selectOptions(isotope, "2");

    // HDO has only the molecular plane left: Cs.
    await waitFor(() => expect(derivedValue("Point group / Abelian subgroup")).toBe("Cs / Cs"));
    // Analytic: x_COM = (m(²H) − m(¹H))·0.757220 Å / M(HDO) = 0.040068 Å, z_COM = 3.021932 u·0.586514 Å / M = 0.093202 Å.
    const [x, , z] = numbers(derivedValue("Centre of mass (Å)"));
    expect(x).toBeCloseTo(0.040068, 5);
    expect(z).toBeCloseTo(0.093202, 5);
    // Ground-state HDO A0, B0, C0 ≈ 23.41, 9.10, 6.42 cm⁻¹ (from memory, microwave spectroscopy); equilibrium
    // constants of this geometry differ from them by vibrational averaging, so within 3 %.
    const cm1 = numbers(derivedValue("Rotational constants A, B, C (cm⁻¹)"));
    [23.41, 9.1, 6.42].forEach((expected, i) => {
      expect(Math.abs(cm1[i]! - expected) / expected).toBeLessThan(0.03);
    });
    // MHz from cm⁻¹: × c = 29 979.2458 MHz per cm⁻¹ (CODATA 2018, exact).
    const mhz = numbers(derivedValue("Rotational constants A, B, C (MHz)"));
    expect(mhz[0]! / cm1[0]!).toBeCloseTo(29_979.2458, -1);
  });

  it("puts an invalid coordinate's message beside it and sends nothing", async () => {
    const { user, form, posts } = await openEditorWithWater();
    // The XYZ comment line became the name.
    expect(within(form).getByLabelText("Name")).toHaveValue("Water");
    const y = within(form).getByLabelText("Atom 3 y (Å)");
    await user.clear(y);
    await user.type(y, "0.1.2");
    expect(y).toHaveAttribute("aria-invalid", "true");
    expect(y).toHaveAccessibleDescription("y must be a number in Å, e.g. -0.757.");
    await user.click(within(form).getByRole("button", { name: "Save target" }));
    expect(
      await within(form).findByText("Nothing was saved: fix the marked fields first."),
    ).toBeInTheDocument();
    expect(posts).toHaveLength(0);

    await user.clear(y);
    await user.type(y, "0");
    expect(y).not.toHaveAttribute("aria-invalid");
    await user.click(within(form).getByRole("button", { name: "Save target" }));
    await waitFor(() => expect(posts).toHaveLength(1));
    expect(posts[0]).toMatchObject({
      name: "Water",
      charge: 0,
      atoms: [{ symbol: "O" }, { symbol: "H" }, { symbol: "H" }],
    });
  });

  it("enters a chosen XYZ file through the upload route, beside the form's fields", async () => {
    const { posts } = install();
    const uploads: { name: unknown; charge: unknown; multiplicity: unknown; hasFile: boolean }[] = [];
    server.use(
      http.post("/api/groups/:groupId/targets/upload", async ({ request }) => {
        const form = await request.formData();
        uploads.push({
          name: form.get("name"),
          charge: form.get("charge"),
          multiplicity: form.get("multiplicity"),
          // jsdom's File reaches Node's fetch without its bytes; the bytes themselves are checked in
          // Chromium (tests/e2e/workspace-newcomer.test.ts) and at the route (targets-upload.test.ts).
          hasFile: form.has("file"),
        });
        return HttpResponse.json(
          { ...waterDetail(), id: "7a260000-0000-4000-8000-00000000000a" },
          { status: 201 },
        );
      }),
    );
    const { user } = renderApp(targetsPath);
    const form = await screen.findByRole("form", { name: "New target" });
    await user.upload(
      within(form).getByLabelText("XYZ file"),
      new File([WATER_XYZ], "water.xyz", { type: "chemical/x-xyz" }),
    );
    await waitFor(() => expect(derivedValue("Point group / Abelian subgroup")).toBe("C2v / C2v"));
    await user.click(within(form).getByRole("button", { name: "Save target" }));
    await waitFor(() => expect(uploads).toHaveLength(1));
    expect(uploads[0]).toEqual({ name: "Water", charge: "0", multiplicity: "", hasFile: true });
    expect(posts).toHaveLength(0);
  });

  it("sends the atoms, not the file, once a row read from the file was changed", async () => {
    const { posts } = install();
    let uploaded = 0;
    server.use(
      http.post("/api/groups/:groupId/targets/upload", () => {
        uploaded += 1;
        return HttpResponse.json(waterDetail(), { status: 201 });
      }),
    );
    const { user } = renderApp(targetsPath);
    const form = await screen.findByRole("form", { name: "New target" });
    await user.upload(
      within(form).getByLabelText("XYZ file"),
      new File([WATER_XYZ], "water.xyz", { type: "chemical/x-xyz" }),
    );
    await waitFor(() => expect(derivedValue("Point group / Abelian subgroup")).toBe("C2v / C2v"));
    await user.selectOptions(within(form).getByLabelText("Atom 2 isotope"), "2");
    await user.click(within(form).getByRole("button", { name: "Save target" }));
    await waitFor(() => expect(posts).toHaveLength(1));
    expect(posts[0]).toMatchObject({
      atoms: [{ symbol: "O" }, { symbol: "H", massNumber: 2 }, { symbol: "H" }],
    });
    expect(uploaded).toBe(0);
  });

  it("recentres the atoms on the centre of mass in one click", async () => {
    const { user, form } = await openEditorWithWater();
    await user.click(screen.getByRole("button", { name: "Recentre" }));
    await waitFor(() => expect(numbers(derivedValue("Centre of mass (Å)"))).toEqual([0, 0, 0]));
    // The oxygen moved down by the old centre of mass, 0.065640 Å (analytic, as above).
    expect(within(form).getByLabelText("Atom 1 z (Å)")).toHaveValue("-0.065640");
    expect(screen.queryByRole("button", { name: "Recentre" })).not.toBeInTheDocument();
  });

  it("says the multiplicity does not fit the electron count in plain words", async () => {
    const { user, form } = await openEditorWithWater();
    await user.type(within(form).getByLabelText("Multiplicity (2S+1)"), "2");
    await waitFor(() =>
      expect(derivedValue("Electrons, spin")).toMatch(/impossible with 10 electrons: an even electron count/),
    );
  });

  it("warns per element a chosen basis does not define", async () => {
    const { user, form } = await openEditorWithWater();
    const first = within(form).getByLabelText("Atom 1 element");
    await user.clear(first);
    await user.type(first, "Xe");
    await user.selectOptions(screen.getByLabelText("Basis set for the coverage check"), "6-31G*");
    // 6-31G* stops at krypton (Basis Set Exchange element lists — from memory; shared/science/basis-coverage).
    expect(await screen.findByText(/^6-31G\* does not define Xe \(atom 1\)/)).toBeInTheDocument();
  });

  it("shows a plain message instead of the 3D view without WebGL", async () => {
    await openEditorWithWater();
    expect(await screen.findByText(/offers no WebGL, so the 3D view is off/)).toBeInTheDocument();
  });

  it("creates an isotopologue in two clicks with hydrogen → deuterium chosen", async () => {
    const { posts } = install();
    const { user } = renderApp(`${targetsPath}/${TARGET_IDS.water}`);
    await user.click(await screen.findByRole("button", { name: "New isotopologue" }));
    await user.click(screen.getByRole("button", { name: "Create isotopologue" }));
    await waitFor(() => expect(posts).toHaveLength(1));
    expect(posts[0]).toEqual({
      name: "Water (²H₂O)",
      isotopes: [
        { atom: 2, massNumber: 2 },
        { atom: 3, massNumber: 2 },
      ],
    });
  });

  it("edits a target's current version and saves it as a new version", async () => {
    const { posts } = install();
    const { user } = renderApp(`${targetsPath}/${TARGET_IDS.water}`);
    await user.click(await screen.findByRole("button", { name: "Edit" }));
    const form = screen.getByRole("form", { name: "Edit Water" });
    expect(within(form).getByLabelText("Atom 2 x (Å)")).toHaveValue("0.757220");
    const x = within(form).getByLabelText("Atom 3 x (Å)");
    await user.clear(x);
    await user.type(x, "-0.8");
    // One O–H bond longer: the mirror plane between the hydrogens is gone.
    await waitFor(() => expect(derivedValue("Point group / Abelian subgroup")).toBe("Cs / Cs"));
    await user.click(within(form).getByRole("button", { name: "Save as a new version" }));
    await waitFor(() => expect(posts).toHaveLength(1));
    expect(posts[0]).toMatchObject({ name: "Water", charge: 0, multiplicity: 1 });
    expect((posts[0] as { atoms: { xAngstrom: number }[] }).atoms[2]!.xAngstrom).toBe(-0.8);
  });
});

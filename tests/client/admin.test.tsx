import { screen, within } from "@testing-library/react";
import { HttpResponse, http } from "msw";
import { describe, expect, it } from "vitest";
import { apiError, installFakeApi } from "./support/fake-api";
import { kestrel, people } from "./support/fixtures";
import { renderApp } from "./support/render-app";
import { server } from "./support/server";

describe("admin: groups", () => {
  it("lists every group and creates a new one", async () => {
    const api = installFakeApi({ me: people.ada });
    server.use(
      http.post("/api/groups", async ({ request }) => {
        const body = (await request.json()) as { slug: string; name: string; description: string };
        const group = {
          id: "5e1f0000-9999-4aaa-8bbb-000000000003",
          ...body,
          createdAt: "2025-05-06T09:00:00.000Z",
          memberCount: 0,
          myRole: null,
        };
        api.state.groups = [...api.state.groups, group];
        return HttpResponse.json(group, { status: 201 });
      }),
    );
    const { user } = renderApp("/admin/groups");

    const table = await screen.findByRole("table", { name: "All research groups" });
    expect(within(table).getByRole("link", { name: kestrel.name })).toHaveAttribute(
      "href",
      `/groups/${kestrel.id}/members`,
    );

    await user.type(screen.getByRole("textbox", { name: "Slug" }), "halvorsen-benchmarks");
    await user.type(screen.getByRole("textbox", { name: "Name" }), "Halvorsen Benchmarks");
    await user.click(screen.getByRole("button", { name: "Create group" }));

    expect(await within(table).findByRole("link", { name: "Halvorsen Benchmarks" })).toBeInTheDocument();
    expect(screen.getByRole("status")).toHaveTextContent("Created Halvorsen Benchmarks");
    // The switcher of a site admin offers every group, including the new one.
    expect(
      within(screen.getByRole("combobox", { name: "Group" })).getByRole("option", {
        name: "Halvorsen Benchmarks",
      }),
    ).toBeInTheDocument();
  });

  it("pins a taken slug (409) to the Slug field", async () => {
    installFakeApi({ me: people.ada });
    server.use(
      http.post("/api/groups", () => apiError(409, "slug_taken", "Another group already uses this slug.")),
    );
    const { user } = renderApp("/admin/groups");

    await screen.findByRole("table", { name: "All research groups" });
    const slug = screen.getByRole("textbox", { name: "Slug" });
    await user.type(slug, kestrel.slug);
    await user.type(screen.getByRole("textbox", { name: "Name" }), "Kestrel again");
    await user.click(screen.getByRole("button", { name: "Create group" }));

    expect(await screen.findByText("Another group already uses this slug.")).toBeInTheDocument();
    expect(slug).toHaveAttribute("aria-invalid", "true");
  });

  it("checks the slug's format in the browser with the contract's message", async () => {
    const api = installFakeApi({ me: people.ada });
    const { user } = renderApp("/admin/groups");

    await screen.findByRole("table", { name: "All research groups" });
    await user.type(screen.getByRole("textbox", { name: "Slug" }), "Plasma Group");
    await user.type(screen.getByRole("textbox", { name: "Name" }), "Plasma group");
    await user.click(screen.getByRole("button", { name: "Create group" }));

    // Message from shared/schemas/groups.ts groupSlugSchema.
    expect(
      await screen.findByText(
        "Use lowercase letters, digits and single hyphens (for example plasma-collisions).",
      ),
    ).toBeInTheDocument();
    expect(api.requests.some((request) => request.method === "POST")).toBe(false);
  });
});

import { screen, waitFor, within } from "@testing-library/react";
import { describe, expect, it } from "vitest";
import { installFakeApi } from "./support/fake-api";
import { KESTREL_ID, kestrel, MARROW_ID, marrow, people } from "./support/fixtures";
import { renderApp } from "./support/render-app";

describe("signed out", () => {
  it("sends a protected address to the sign-in page, which links to the identity provider with returnTo", async () => {
    installFakeApi({ me: null });
    const { router } = renderApp(`/groups/${KESTREL_ID}/members`);

    const signIn = await screen.findByRole("link", { name: "Sign in with your institution" });
    expect(router.state.location.pathname).toBe("/signin");
    // Contract (API description): GET /api/auth/login?returnTo=/path starts the identity-provider sign-in.
    expect(signIn).toHaveAttribute(
      "href",
      `/api/auth/login?returnTo=${encodeURIComponent(`/groups/${KESTREL_ID}/members`)}`,
    );
    expect(screen.getByRole("heading", { level: 1, name: "Sigmaflow" })).toBeInTheDocument();
    expect(screen.queryByRole("navigation", { name: "Main" })).not.toBeInTheDocument();
  });

  it("ignores a returnTo that points off the site", async () => {
    installFakeApi({ me: null });
    renderApp("/signin?returnTo=//evil.example/steal");
    const signIn = await screen.findByRole("link", { name: "Sign in with your institution" });
    expect(signIn).toHaveAttribute("href", "/api/auth/login?returnTo=%2F");
  });
});

describe("navigation by role", () => {
  it("gives a group member neither Invitations nor Admin", async () => {
    installFakeApi({ me: people.tomas, groups: [{ ...kestrel, myRole: "member" }] });
    renderApp(`/groups/${KESTREL_ID}/runs`);

    const nav = await screen.findByRole("navigation", { name: "Main" });
    expect(within(nav).getByRole("link", { name: "Members" })).toHaveAttribute(
      "href",
      `/groups/${KESTREL_ID}/members`,
    );
    expect(within(nav).getByRole("link", { name: "Runs" })).toBeInTheDocument();
    expect(within(nav).queryByRole("link", { name: "Invitations" })).not.toBeInTheDocument();
    expect(within(nav).queryByRole("heading", { name: "Admin" })).not.toBeInTheDocument();
    expect(within(nav).queryByRole("link", { name: "People" })).not.toBeInTheDocument();
    expect(screen.getByText("Member", { selector: "span" })).toBeInTheDocument();
  });

  it("gives a site admin the Admin section and its pages", async () => {
    installFakeApi({ me: people.ada });
    const { user } = renderApp(`/groups/${KESTREL_ID}/members`);

    const nav = await screen.findByRole("navigation", { name: "Main" });
    expect(within(nav).getByRole("heading", { name: "Admin" })).toBeInTheDocument();
    expect(within(nav).getByRole("link", { name: "Invitations" })).toBeInTheDocument();
    expect(screen.getByText("Site admin")).toBeInTheDocument();

    await user.click(within(nav).getByRole("link", { name: "People" }));
    expect(await screen.findByRole("heading", { level: 1, name: "People" })).toBeInTheDocument();
    const table = await screen.findByRole("table", { name: "Everyone with a Sigmaflow account" });
    const adaRow = within(table).getByRole("row", { name: /Ada Quill/ });
    expect(within(adaRow).getByText("Site admin")).toBeInTheDocument();
  });

  it("turns a member away from the admin pages", async () => {
    installFakeApi({ me: people.tomas });
    renderApp("/admin/people");
    expect(await screen.findByRole("heading", { name: "This page is not open to you" })).toBeInTheDocument();
  });

  it("shows people without a group how to get invited instead of group pages", async () => {
    installFakeApi({ me: people.mei, groups: [] });
    const { router } = renderApp("/");

    expect(await screen.findByRole("heading", { name: "You are not in a group yet" })).toBeInTheDocument();
    expect(within(screen.getByRole("main")).getByText(people.mei.user.email)).toBeInTheDocument();
    expect(router.state.location.pathname).toBe("/");
    const nav = screen.getByRole("navigation", { name: "Main" });
    expect(within(nav).queryByRole("link", { name: "Runs" })).not.toBeInTheDocument();
    expect(within(nav).getByRole("link", { name: "API tokens" })).toBeInTheDocument();
  });

  it("shows a not-found page for an unknown address", async () => {
    installFakeApi({ me: people.tomas });
    renderApp("/no/such/page");
    expect(await screen.findByRole("heading", { name: "Page not found" })).toBeInTheDocument();
  });
});

describe("group switcher", () => {
  it("lists the person's groups, opens the chosen one on the same page and remembers it", async () => {
    installFakeApi({ me: people.noor, groups: [kestrel, marrow] });
    const { user, router } = renderApp(`/groups/${KESTREL_ID}/members`);

    const switcher = await screen.findByRole("combobox", { name: "Group" });
    expect(
      within(switcher)
        .getAllByRole("option")
        .map((option) => option.textContent),
    ).toEqual([kestrel.name, marrow.name]);
    expect(switcher).toHaveValue(KESTREL_ID);

    await user.selectOptions(switcher, marrow.name);

    await waitFor(() => expect(router.state.location.pathname).toBe(`/groups/${MARROW_ID}/members`));
    expect(await screen.findByText(marrow.name, { selector: "p" })).toBeInTheDocument();
    expect(window.localStorage.getItem("sigmaflow.lastGroupId")).toBe(MARROW_ID);
  });

  it("lands on the group chosen last time", async () => {
    installFakeApi({ me: people.noor, groups: [kestrel, marrow] });
    window.localStorage.setItem("sigmaflow.lastGroupId", MARROW_ID);
    const { router } = renderApp("/");
    await waitFor(() => expect(router.state.location.pathname).toBe(`/groups/${MARROW_ID}/runs`));
    expect(await screen.findByRole("heading", { level: 1, name: "Runs" })).toBeInTheDocument();
  });
});

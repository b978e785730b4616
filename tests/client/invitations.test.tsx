import { screen, waitFor, within } from "@testing-library/react";
import { HttpResponse, http } from "msw";
import { describe, expect, it } from "vitest";
import { apiError, installFakeApi } from "./support/fake-api";
import { KESTREL_ID, kestrel, marrow, pendingInvitation, people } from "./support/fixtures";
import { renderApp } from "./support/render-app";
import { server } from "./support/server";

const invitationsPath = `/groups/${KESTREL_ID}/invitations`;

describe("invitations page", () => {
  it("shows the API's 422 message at the E-mail field, then lists the invitation once it is sent", async () => {
    const api = installFakeApi({ me: people.noor });
    let rejectNext = true;
    server.use(
      http.post("/api/groups/:groupId/invitations", () => {
        if (!rejectNext) return undefined; // falls through to the fake API, which stores the invitation
        rejectNext = false;
        return apiError(422, "validation_failed", "The invitation is not valid.", {
          fieldErrors: { email: ["Lina Okafor is already a member of this group."] },
        });
      }),
    );
    const { user } = renderApp(invitationsPath);

    const form = await screen.findByRole("form", { name: "Invite by e-mail" });
    expect(await screen.findByText("No invitations sent yet")).toBeInTheDocument();
    const email = within(form).getByRole("textbox", { name: "E-mail" });
    await user.type(email, "lina.okafor@partner.example");
    await user.click(within(form).getByRole("button", { name: "Send invitation" }));

    const fieldError = await within(form).findByText("Lina Okafor is already a member of this group.");
    expect(fieldError).toHaveAttribute("role", "alert");
    expect(email).toHaveAttribute("aria-invalid", "true");
    expect(email).toHaveAccessibleDescription(expect.stringContaining("already a member"));

    await user.clear(email);
    await user.type(email, "Mei.Tanaka@Halvorsen.example");
    await user.selectOptions(within(form).getByRole("combobox", { name: "Role" }), "Collaborator");
    await user.click(within(form).getByRole("button", { name: "Send invitation" }));

    const table = await screen.findByRole("table", { name: "Invitations" });
    const row = within(table).getByRole("row", { name: /mei\.tanaka@halvorsen\.example/ });
    expect(within(row).getByText("Pending")).toBeInTheDocument();
    expect(within(row).getByText("Collaborator")).toBeInTheDocument();
    expect(within(form).queryByRole("alert")).not.toBeInTheDocument();
    // shared/schemas/common.ts emailSchema lower-cases addresses before they are sent.
    const sent = api.requests.filter((request) => request.method === "POST").at(-1);
    expect(sent?.body).toEqual({ email: "mei.tanaka@halvorsen.example", role: "collaborator" });
    expect(sent?.headers.get("x-csrf-token")).toBe(people.noor.csrfToken);
  });

  it("catches a malformed address in the browser with the contract's own message", async () => {
    const api = installFakeApi({ me: people.noor });
    const { user } = renderApp(invitationsPath);

    const form = await screen.findByRole("form", { name: "Invite by e-mail" });
    await user.type(within(form).getByRole("textbox", { name: "E-mail" }), "not-an-address");
    await user.click(within(form).getByRole("button", { name: "Send invitation" }));

    // Message from shared/schemas/common.ts emailSchema.
    expect(await within(form).findByText("Enter a valid e-mail address.")).toBeInTheDocument();
    expect(api.requests.some((request) => request.method === "POST")).toBe(false);
  });

  it("revokes a pending invitation after confirmation", async () => {
    const api = installFakeApi({ me: people.noor, invitations: { [KESTREL_ID]: [pendingInvitation()] } });
    const { user } = renderApp(invitationsPath);

    await user.click(
      await screen.findByRole("button", { name: "Revoke invitation for mei.tanaka@halvorsen.example" }),
    );
    const dialog = screen.getByRole("dialog", { name: "Revoke this invitation?" });
    await user.click(within(dialog).getByRole("button", { name: "Revoke invitation" }));

    const row = await screen.findByRole("row", { name: /mei\.tanaka/ });
    await waitFor(() => expect(within(row).getByText("Revoked")).toBeInTheDocument());
    expect(within(row).queryByRole("button", { name: /Revoke/ })).not.toBeInTheDocument();
    const revoked = api.requests.find((request) => request.method === "DELETE");
    expect(revoked?.path).toBe(`/api/groups/${KESTREL_ID}/invitations/${pendingInvitation().id}`);
  });

  it("is closed to members who are not admins of the group", async () => {
    installFakeApi({ me: people.noor, groups: [kestrel, marrow] });
    renderApp(`/groups/${marrow.id}/invitations`);
    expect(await screen.findByRole("heading", { name: "This page is not open to you" })).toBeInTheDocument();
    expect(screen.getByText("Only the group's admins can send and revoke invitations.")).toBeInTheDocument();
  });
});

describe("accepting an invitation", () => {
  const token = "inv_4Jq9wX2";

  it("previews the invitation and opens the group's members page after accepting", async () => {
    const api = installFakeApi({ me: people.mei, groups: [kestrel], members: { [KESTREL_ID]: [] } });
    server.use(
      http.get("/api/invitations/:token", () =>
        HttpResponse.json({
          groupName: kestrel.name,
          groupSlug: kestrel.slug,
          email: people.mei.user.email,
          role: "member",
          status: "pending",
          invitedBy: "Noor Vasquez",
          expiresAt: "2099-05-16T08:00:00.000Z",
        }),
      ),
      http.post("/api/invitations/:token/accept", () => {
        api.state.me = {
          ...people.mei,
          memberships: [
            { groupId: KESTREL_ID, groupSlug: kestrel.slug, groupName: kestrel.name, role: "member" },
          ],
        };
        return HttpResponse.json({ groupId: KESTREL_ID, role: "member" });
      }),
    );
    const { user, router } = renderApp(`/invitations/${token}`);

    expect(await screen.findByRole("heading", { name: kestrel.name })).toBeInTheDocument();
    expect(screen.getByText("Noor Vasquez invited you to join")).toBeInTheDocument();
    await user.click(screen.getByRole("button", { name: "Accept invitation" }));

    await waitFor(() => expect(router.state.location.pathname).toBe(`/groups/${KESTREL_ID}/members`));
    expect(await screen.findByRole("heading", { level: 1, name: "Members" })).toBeInTheDocument();
    expect(screen.getByRole("combobox", { name: "Group" })).toHaveValue(KESTREL_ID);
  });

  it("explains an expired invitation", async () => {
    installFakeApi({ me: people.mei, groups: [] });
    server.use(
      http.get("/api/invitations/:token", () =>
        HttpResponse.json({
          groupName: kestrel.name,
          groupSlug: kestrel.slug,
          email: people.mei.user.email,
          role: "member",
          status: "expired",
          invitedBy: "Noor Vasquez",
          expiresAt: "2024-01-01T00:00:00.000Z",
        }),
      ),
    );
    renderApp(`/invitations/${token}`);
    expect(await screen.findByRole("heading", { name: "This invitation has expired" })).toBeInTheDocument();
    expect(screen.queryByRole("button", { name: "Accept invitation" })).not.toBeInTheDocument();
  });

  it("warns before accepting an invitation sent to another account", async () => {
    installFakeApi({ me: people.tomas });
    server.use(
      http.get("/api/invitations/:token", () =>
        HttpResponse.json({
          groupName: marrow.name,
          groupSlug: marrow.slug,
          email: people.mei.user.email,
          role: "member",
          status: "pending",
          invitedBy: "Ravi Iyer",
          expiresAt: "2099-05-16T08:00:00.000Z",
        }),
      ),
    );
    renderApp(`/invitations/${token}`);
    const warning = await screen.findByText("You are signed in with a different account");
    expect(warning.closest("[role=status]")).toHaveTextContent(people.mei.user.email);
    expect(screen.getByRole("button", { name: "Accept invitation" })).toBeDisabled();
  });

  it("says so when the link is unknown", async () => {
    installFakeApi({ me: people.mei, groups: [] });
    server.use(
      http.get("/api/invitations/:token", () => apiError(404, "not_found", "No invitation with this token.")),
    );
    renderApp(`/invitations/${token}`);
    expect(
      await screen.findByRole("heading", { name: "This invitation link is not valid" }),
    ).toBeInTheDocument();
  });
});

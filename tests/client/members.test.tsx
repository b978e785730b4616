import { screen, waitFor, within } from "@testing-library/react";
import { HttpResponse, http } from "msw";
import { describe, expect, it } from "vitest";
import { apiError, installFakeApi } from "./support/fake-api";
import { KESTREL_ID, kestrel, kestrelMembers, people, USER_IDS } from "./support/fixtures";
import { renderApp } from "./support/render-app";
import { server } from "./support/server";

const membersPath = `/groups/${KESTREL_ID}/members`;

describe("members page", () => {
  it("lists name, e-mail, role and joined date", async () => {
    installFakeApi({ me: people.tomas, groups: [{ ...kestrel, myRole: "member" }] });
    renderApp(membersPath);

    const table = await screen.findByRole("table", { name: `Members of ${kestrel.name}` });
    const headers = within(table)
      .getAllByRole("columnheader")
      .map((cell) => cell.textContent);
    expect(headers).toEqual(["Name", "E-mail", "Role", "Joined"]);
    const lina = within(table).getByRole("row", { name: /Lina Okafor/ });
    expect(within(lina).getByText("lina.okafor@partner.example")).toBeInTheDocument();
    expect(within(lina).getByText("Collaborator")).toBeInTheDocument();
    // A member (not an admin) gets no controls.
    expect(within(table).queryByRole("combobox")).not.toBeInTheDocument();
    expect(within(table).queryByRole("button", { name: /Remove/ })).not.toBeInTheDocument();
  });

  it("lets a group admin change a role with a PATCH that carries the session's CSRF token", async () => {
    const api = installFakeApi({ me: people.noor });
    const { user } = renderApp(membersPath);

    const roleSelect = await screen.findByRole("combobox", { name: "Role for Tomás Brandt" });
    expect(roleSelect).toHaveValue("member");
    await user.selectOptions(roleSelect, "Admin");

    await waitFor(() => expect(api.requests.some((request) => request.method === "PATCH")).toBe(true));
    const patch = api.requests.find((request) => request.method === "PATCH");
    expect(patch?.path).toBe(`/api/groups/${KESTREL_ID}/members/${USER_IDS.tomas}`);
    // Contract (shared/schemas/auth.ts meSchema.csrfToken): echoed as x-csrf-token on every mutation.
    expect(patch?.headers.get("x-csrf-token")).toBe(people.noor.csrfToken);
    expect(patch?.body).toEqual({ role: "admin" });
    await waitFor(() =>
      expect(screen.getByRole("combobox", { name: "Role for Tomás Brandt" })).toHaveValue("admin"),
    );
  });

  it("shows the server's 409 inside the confirm dialog when removing the last admin", async () => {
    installFakeApi({ me: people.noor });
    server.use(
      http.delete("/api/groups/:groupId/members/:userId", () =>
        apiError(409, "last_admin", "A group needs at least one admin. Make someone else admin first."),
      ),
    );
    const { user } = renderApp(membersPath);

    await user.click(await screen.findByRole("button", { name: "Remove Noor Vasquez" }));
    const dialog = screen.getByRole("dialog", { name: "Remove Noor Vasquez?" });
    expect(within(dialog).getByRole("button", { name: "Cancel" })).toHaveFocus();
    await user.click(within(dialog).getByRole("button", { name: "Remove member" }));

    expect(await within(dialog).findByRole("alert")).toHaveTextContent(
      "A group needs at least one admin. Make someone else admin first.",
    );
    expect(screen.getByRole("row", { name: /Noor Vasquez/ })).toBeInTheDocument();
  });

  it("removes a member after confirmation", async () => {
    const api = installFakeApi({ me: people.noor });
    const { user } = renderApp(membersPath);

    await user.click(await screen.findByRole("button", { name: "Remove Lina Okafor" }));
    await user.click(screen.getByRole("button", { name: "Remove member" }));

    await waitFor(() => expect(screen.queryByRole("row", { name: /Lina Okafor/ })).not.toBeInTheDocument());
    expect(screen.queryByRole("dialog")).not.toBeInTheDocument();
    const removal = api.requests.find((request) => request.method === "DELETE");
    expect(removal?.path).toBe(`/api/groups/${KESTREL_ID}/members/${USER_IDS.lina}`);
    expect(removal?.headers.get("x-csrf-token")).toBe(people.noor.csrfToken);
  });

  it("offers a retry after a server error and shows the list once the server answers", async () => {
    installFakeApi({ me: people.noor });
    // The server fails until the test "repairs" it, however often the page asks.
    let serverHealthy = false;
    server.use(
      http.get("/api/groups/:groupId/members", () =>
        serverHealthy
          ? HttpResponse.json({ members: kestrelMembers() })
          : apiError(500, "internal", "The database did not answer in time."),
      ),
    );
    const { user } = renderApp(membersPath);

    const alert = await screen.findByRole("alert");
    expect(alert).toHaveTextContent("Sigmaflow's server had a problem");
    expect(alert).toHaveTextContent("The database did not answer in time.");
    serverHealthy = true;
    await user.click(within(alert).getByRole("button", { name: "Try again" }));

    expect(await screen.findByRole("row", { name: /Tomás Brandt/ })).toBeInTheDocument();
    expect(screen.queryByRole("alert")).not.toBeInTheDocument();
  });

  it("retries a failed page load from the route's error boundary", async () => {
    installFakeApi({ me: people.noor });
    let serverHealthy = false;
    server.use(
      http.get("/api/groups/:groupId", () =>
        serverHealthy ? HttpResponse.json(kestrel) : apiError(503, "unavailable", "Sigmaflow is restarting."),
      ),
    );
    const { user } = renderApp(membersPath);

    const alert = await screen.findByRole("alert");
    expect(alert).toHaveTextContent("Sigmaflow is restarting.");
    // The shell stays: only the group's pages are replaced by the error.
    expect(screen.getByRole("navigation", { name: "Main" })).toBeInTheDocument();
    serverHealthy = true;
    await user.click(within(alert).getByRole("button", { name: "Try again" }));

    expect(await screen.findByRole("heading", { level: 1, name: "Members" })).toBeInTheDocument();
  });
});

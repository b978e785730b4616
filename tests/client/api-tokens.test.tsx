import { screen, waitFor, within } from "@testing-library/react";
import { describe, expect, it } from "vitest";
import { installFakeApi } from "./support/fake-api";
import { apiToken, people } from "./support/fixtures";
import { renderApp } from "./support/render-app";

// The fake API (support/fake-api.ts) answers POST /api/tokens with this secret.
const SECRET = "sf_n7wq_SECRET-9f2c4e7a1b3d5f60";

describe("API tokens", () => {
  it("shows a new token's secret once, then only its prefix in the list", async () => {
    const api = installFakeApi({ me: people.tomas });
    const { user } = renderApp("/settings/tokens");

    expect(await screen.findByText("No API tokens")).toBeInTheDocument();
    const form = screen.getByRole("form", { name: "Create an API token" });
    await user.type(within(form).getByRole("textbox", { name: "Name" }), "kestrel-cluster-submit");
    await user.selectOptions(within(form).getByRole("combobox", { name: "Expires after" }), "30 days");
    await user.click(within(form).getByRole("button", { name: "Create token" }));

    expect(await screen.findByLabelText("New API token secret")).toHaveValue(SECRET);
    expect(screen.getByText(/It will not be shown again/)).toBeInTheDocument();
    const created = api.requests.find(
      (request) => request.method === "POST" && request.path === "/api/tokens",
    );
    expect(created?.body).toEqual({ name: "kestrel-cluster-submit", expiresInDays: 30 });
    expect(created?.headers.get("x-csrf-token")).toBe(people.tomas.csrfToken);

    const row = await screen.findByRole("row", { name: /kestrel-cluster-submit/ });
    expect(within(row).getByText("sf_n7wq…")).toBeInTheDocument();
    expect(within(row).getByText("Never")).toBeInTheDocument();

    await user.click(screen.getByRole("button", { name: "Done, I have stored it" }));
    await waitFor(() => expect(screen.queryByLabelText("New API token secret")).not.toBeInTheDocument());
    expect(screen.queryByDisplayValue(SECRET)).not.toBeInTheDocument();
    expect(document.body).not.toHaveTextContent(SECRET);
    expect(screen.getByRole("form", { name: "Create an API token" })).toBeInTheDocument();
  });

  it("asks for a name before sending anything", async () => {
    const api = installFakeApi({ me: people.tomas });
    const { user } = renderApp("/settings/tokens");

    const form = await screen.findByRole("form", { name: "Create an API token" });
    await user.click(within(form).getByRole("button", { name: "Create token" }));
    // Message from shared/schemas/auth.ts createApiTokenRequestSchema.
    expect(
      await within(form).findByText("Name the token after the script that will use it."),
    ).toBeInTheDocument();
    expect(api.requests.some((request) => request.method === "POST")).toBe(false);
  });

  it("explains the Authorization header and revokes a token after confirmation", async () => {
    const api = installFakeApi({ me: people.tomas, tokens: [apiToken()] });
    const { user } = renderApp("/settings/tokens");

    expect(await screen.findByText(/Bearer <token>/)).toBeInTheDocument();
    await user.click(await screen.findByRole("button", { name: "Revoke cluster-submit" }));
    const dialog = screen.getByRole("dialog", { name: "Revoke “cluster-submit”?" });
    await user.click(within(dialog).getByRole("button", { name: "Revoke token" }));

    expect(await screen.findByText("No API tokens")).toBeInTheDocument();
    const revoked = api.requests.find((request) => request.method === "DELETE");
    expect(revoked?.path).toBe(`/api/tokens/${apiToken().id}`);
  });
});

/**
 * Uploading an XYZ file from the "Add a target from XYZ" form against the fake API: the file goes as
 * multipart/form-data with the CSRF token, and the server's refusal (413 over 256 KiB) stands beside the
 * file field.
 */
import { screen, waitFor, within } from "@testing-library/react";
import { HttpResponse, http } from "msw";
import { describe, expect, it } from "vitest";
import { apiError, installFakeApi } from "./support/fake-api";
import { KESTREL_ID, kestrel, people } from "./support/fixtures";
import { renderApp } from "./support/render-app";
import { server } from "./support/server";
import { targetList, water } from "./support/target-fixtures";

const HF_XYZ = "2\nhydrogen fluoride\nH 0 0 0\nF 0 0 0.917\n";

function install(reply: () => Response) {
  installFakeApi({ me: people.tomas, groups: [{ ...kestrel, myRole: "member" }] });
  const uploads: {
    fields: Record<string, string>;
    file: { name: string; text: string } | null;
    csrf: string | null;
  }[] = [];
  server.use(
    http.get("/api/groups/:groupId/targets", () => HttpResponse.json(targetList())),
    http.post("/api/groups/:groupId/targets/upload", async ({ request }) => {
      const form = await request.formData();
      const fields: Record<string, string> = {};
      let file: { name: string; text: string } | null = null;
      for (const [key, value] of form) {
        if (typeof value === "string") fields[key] = value;
        else file = { name: value.name, text: await value.text() };
      }
      uploads.push({ fields, file, csrf: request.headers.get("x-csrf-token") });
      return reply();
    }),
  );
  return { uploads };
}

describe("uploading an XYZ file", () => {
  it("sends the chosen file with the name and charge and confirms the target", async () => {
    const { uploads } = install(() =>
      HttpResponse.json({ ...water, name: "Hydrogen fluoride", formula: "FH" }, { status: 201 }),
    );
    const { user } = renderApp(`/groups/${KESTREL_ID}/targets`);
    const form = await screen.findByRole("form", { name: "Add a target from XYZ" });
    await user.type(within(form).getByLabelText("Name"), "Hydrogen fluoride");
    await user.upload(
      within(form).getByLabelText("XYZ file"),
      new File([HF_XYZ], "hf.xyz", { type: "text/plain" }),
    );
    expect(within(form).getByLabelText("XYZ file")).toHaveAccessibleDescription(
      /hf\.xyz \(\d+ bytes\) will be uploaded/,
    );
    await user.click(within(form).getByRole("button", { name: "Add target" }));
    await waitFor(() => expect(uploads).toHaveLength(1));
    // jsdom's File does not survive Node's multipart encoding (its bytes arrive as "undefined"), so the
    // file's content is checked by tests/integration/targets-upload.test.ts; here: a file part beside the fields.
    expect(uploads[0]!.fields).toEqual({ name: "Hydrogen fluoride", charge: "0" });
    expect(uploads[0]!.file).not.toBeNull();
    expect(uploads[0]!.csrf).toBe(people.tomas.csrfToken);
    expect(await within(form).findByRole("status")).toHaveTextContent("Target Hydrogen fluoride entered: FH");
  });

  it("shows the server's 413 beside the file field", async () => {
    install(() =>
      apiError(
        413,
        "file_too_large",
        "The XYZ file is larger than 256 KiB (262144 bytes), the most accepted.",
        {
          path: "file",
          maxBytes: 262144,
        },
      ),
    );
    const { user } = renderApp(`/groups/${KESTREL_ID}/targets`);
    const form = await screen.findByRole("form", { name: "Add a target from XYZ" });
    await user.type(within(form).getByLabelText("Name"), "Too big");
    const input = within(form).getByLabelText("XYZ file");
    await user.upload(input, new File(["x".repeat(300_000)], "big.xyz", { type: "text/plain" }));
    await user.click(within(form).getByRole("button", { name: "Add target" }));
    await waitFor(() => expect(input).toHaveAccessibleDescription(/larger than 256 KiB/));
    expect(input).toHaveAttribute("aria-invalid", "true");
  });
});

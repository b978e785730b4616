/**
 * Signing in as a demo account in Chromium, and calling Sigmaflow's HTTP API as that signed-in person
 * (the session cookie of the page's context, with the CSRF token from `GET /api/me` on every write), the
 * way the client does.
 */
import type { Page } from "playwright-core";
import { expect } from "vitest";
import { DEMO_ACCOUNTS, DEMO_PASSWORD, type DemoAccount } from "../../../deploy/demo/accounts";
import { meSchema } from "../../../shared/schemas/auth";
import { e2eEnv } from "./browser";

export function demoAccount(subject: string): DemoAccount {
  const account = DEMO_ACCOUNTS.find((a) => a.subject === subject);
  if (!account) throw new Error(`no demo account ${subject}`);
  return account;
}

/** Signs in through the development identity provider and waits for the person's name on the page. */
export async function signInAs(page: Page, subject: string): Promise<void> {
  const { appUrl } = e2eEnv();
  const account = demoAccount(subject);
  await page.goto(appUrl);
  await page.waitForURL(/\/signin/);
  await page.getByRole("link", { name: /Sign in with your institution/ }).click();
  await page.getByLabel("E-mail").fill(account.email);
  await page.getByLabel("Password").fill(DEMO_PASSWORD);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(
    (url) => url.origin === new URL(appUrl).origin && !url.pathname.startsWith("/signin"),
  );
  await page.getByText(account.displayName).first().waitFor({ state: "visible" });
}

// biome-ignore lint/suspicious/noExplicitAny: test responses are read loosely, field by field.
export type ApiResponse = { status: number; body: any };
export type SessionApi = ((method: string, path: string, body?: unknown) => Promise<ApiResponse>) & {
  /** The signed-in person's groups, as `GET /api/me` lists them. */
  memberships: { groupId: string; groupSlug: string; groupName: string; role: string }[];
};

/** The API as the person signed in on `page` (same cookies), with the CSRF token writes need. */
export async function sessionApi(page: Page): Promise<SessionApi> {
  const { appUrl } = e2eEnv();
  const meResponse = await page.request.get(`${appUrl}/api/me`);
  expect(meResponse.status()).toBe(200);
  const me = meSchema.parse(await meResponse.json());
  const call = async (method: string, path: string, body?: unknown): Promise<ApiResponse> => {
    const response = await page.request.fetch(`${appUrl}${path}`, {
      method,
      headers: {
        "x-csrf-token": me.csrfToken,
        ...(body === undefined ? {} : { "content-type": "application/json" }),
      },
      ...(body === undefined ? {} : { data: JSON.stringify(body) }),
    });
    const text = await response.text();
    let parsed: unknown = text;
    try {
      parsed = text === "" ? null : JSON.parse(text);
    } catch {}
    return { status: response.status(), body: parsed };
  };
  return Object.assign(call, { memberships: me.memberships });
}

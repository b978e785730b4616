/**
 * End to end in Chromium against the running Sigmaflow (deploy/test.sh starts it): sign in through the
 * development identity provider, see the navigation each role should see, invite a member, read the
 * invitation in the development inbox, accept it as the invitee, and sign out.
 * Screenshots land in E2E_ARTIFACTS_DIR for a person to look at.
 */
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from "../../deploy/demo/accounts";
import { e2eEnv, launchChromium, newPage, screenshot } from "./support/browser";

const env = e2eEnv();
const account = (subject: string) => DEMO_ACCOUNTS.find((a) => a.subject === subject)!;
let browser: Browser;
let closeBrowser: () => Promise<void>;

async function signIn(page: Page, subject: string) {
  await page.goto(env.appUrl);
  await page.waitForURL(/\/signin/);
  await page.getByRole("link", { name: /Sign in with your institution/ }).click();
  await page.getByLabel("E-mail").fill(account(subject).email);
  await page.getByLabel("Password").fill(DEMO_PASSWORD);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(
    (url) => url.origin === new URL(env.appUrl).origin && !url.pathname.startsWith("/signin"),
  );
  await expect.poll(() => page.getByText(account(subject).displayName).first().isVisible()).toBe(true);
}

async function navLinks(page: Page): Promise<string[]> {
  const nav = page.getByRole("navigation", { name: "Main" });
  await nav.getByRole("link").first().waitFor();
  return (await nav.getByRole("link").allInnerTexts()).map((text) => text.trim());
}

beforeAll(async () => {
  ({ browser, close: closeBrowser } = await launchChromium());
});
afterAll(async () => {
  await closeBrowser?.();
});

describe("roles see their navigation", () => {
  const expectations = [
    { subject: "demo-site-admin", has: ["People", "API tokens"], lacks: [] as string[] },
    { subject: "demo-group-admin", has: ["Runs", "Members", "Invitations"], lacks: ["People"] },
    { subject: "demo-researcher", has: ["Runs", "Members"], lacks: ["Invitations", "People"] },
    { subject: "demo-collaborator", has: ["Runs", "Members"], lacks: ["Invitations", "People"] },
  ];
  for (const { subject, has, lacks } of expectations) {
    it(`${account(subject).persona}`, async () => {
      const { context, page } = await newPage(browser);
      await signIn(page, subject);
      const links = await navLinks(page);
      for (const label of has) expect(links).toContain(label);
      for (const label of lacks) expect(links).not.toContain(label);
      await screenshot(page, `nav-${subject}`);
      await context.close();
    });
  }
});

describe("invitation by e-mail", () => {
  it("a group admin invites a newcomer, who reads the mail and joins", async () => {
    const admin = await newPage(browser);
    await signIn(admin.page, "demo-group-admin");
    await admin.page
      .getByRole("navigation", { name: "Main" })
      .getByRole("link", { name: "Invitations" })
      .click();
    const form = admin.page.getByRole("form", { name: "Invite by e-mail" });
    await form.getByLabel("E-mail").fill("not an address");
    await form.getByRole("button", { name: "Send invitation" }).click();
    await expect.poll(() => form.getByText(/valid e-mail/i).isVisible()).toBe(true);
    const newcomer = account("demo-newcomer");
    await form.getByLabel("E-mail").fill(newcomer.email);
    await form.getByRole("button", { name: "Send invitation" }).click();
    await expect
      .poll(() => admin.page.getByRole("cell", { name: newcomer.email }).first().isVisible())
      .toBe(true);
    await screenshot(admin.page, "invitations-sent");

    await admin.page.goto(env.inboxUrl);
    const subject = admin.page.getByRole("link", { name: /Invitation to Kestrel Plasma Collisions/ }).first();
    await subject.click();
    const acceptLink = admin.page.getByRole("link", { name: /\/invitations\// }).first();
    const href = await acceptLink.getAttribute("href");
    expect(href).toMatch(new RegExp(`^${env.appUrl}/invitations/[A-Za-z0-9_-]+$`));
    await screenshot(admin.page, "inbox-invitation");

    // Signing out ends the session: the app asks to sign in again.
    await admin.page.goto(env.appUrl);
    await admin.page.getByRole("button", { name: "Sign out" }).click();
    await admin.page.waitForURL(/\/signin/);
    await screenshot(admin.page, "signed-out");
    await admin.context.close();

    const invitee = await newPage(browser);
    await signIn(invitee.page, "demo-newcomer");
    await screenshot(invitee.page, "newcomer-without-group");
    await invitee.page.goto(href!);
    await invitee.page.getByRole("button", { name: "Accept invitation" }).click();
    await invitee.page.waitForURL(/\/groups\/[^/]+\/members/);
    await expect
      .poll(() => invitee.page.getByRole("cell", { name: newcomer.email }).first().isVisible())
      .toBe(true);
    await screenshot(invitee.page, "newcomer-joined");
    await invitee.context.close();
  });
});

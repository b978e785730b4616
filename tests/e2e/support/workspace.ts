/**
 * What each end-to-end file starts from: Chromium, the development host registered for the demo group by
 * its admin (under `hostName`), a worker process, and a researcher of the group signed in on a page of
 * their own with their session's API client. `close` cancels a run the file left unfinished, then stops
 * the browser, the worker and the host.
 */
import type { Browser, BrowserContext, Page } from "playwright-core";
import { launchChromium, newPage } from "./browser";
import { registerDevHostAsAdmin, spawnWorker, startDevHost } from "./engine";
import { type SessionApi, sessionApi, signInAs } from "./session";

export const DEMO_GROUP_SLUG = "kestrel-plasma";

export type ResearcherWorkspace = {
  browser: Browser;
  context: BrowserContext;
  page: Page;
  api: SessionApi;
  groupId: string;
  hostId: string;
  worker: ReturnType<typeof spawnWorker>;
  close(unfinishedRunId?: string): Promise<void>;
};

export async function openResearcherWorkspace(hostName: string): Promise<ResearcherWorkspace> {
  const { browser, close: closeBrowser } = await launchChromium();
  const host = await startDevHost();
  const worker = spawnWorker();
  const stop = async () => {
    await closeBrowser();
    await worker.stop();
    await host.stop();
  };
  try {
    const admin = await newPage(browser);
    await signInAs(admin.page, "demo-group-admin");
    const adminApi = await sessionApi(admin.page);
    const groupId = adminApi.memberships.find((m) => m.groupSlug === DEMO_GROUP_SLUG)!.groupId;
    const hostId = await registerDevHostAsAdmin(adminApi, groupId, host, hostName);
    await admin.context.close();

    const { context, page } = await newPage(browser);
    await signInAs(page, "demo-researcher");
    const api = await sessionApi(page);
    return {
      browser,
      context,
      page,
      api,
      groupId,
      hostId,
      worker,
      async close(unfinishedRunId) {
        if (unfinishedRunId) {
          const run = await api("GET", `/api/runs/${unfinishedRunId}`).catch(() => null);
          if (run && !["done", "failed", "cancelled"].includes(run.body?.state)) {
            await api("POST", `/api/runs/${unfinishedRunId}/cancel`).catch(() => undefined);
          }
        }
        await stop();
      },
    };
  } catch (error) {
    await stop();
    throw error;
  }
}

import "@testing-library/jest-dom/vitest";
import { cleanup, configure } from "@testing-library/react";
import { afterAll, afterEach, beforeAll, vi } from "vitest";
import { server } from "./support/server";

// The live feed's socket never reaches a server unless a test drives it (support/fake-socket.ts): pages
// behave as with the feed away, and no test opens a real connection.
vi.mock("socket.io-client", () => import("./support/fake-socket"));
// jsdom cannot run xterm: the log terminal shows its bytes as text instead (support/fake-terminal.ts).
vi.mock("@/features/live/terminal/xterm-terminal", () => import("./support/fake-terminal"));

// Route pages are lazy modules: the first import in a test file is transformed on demand and can take
// seconds on a busy two-core machine, so waits (which end as soon as their condition holds) allow for it.
configure({ asyncUtilTimeout: 8_000 });
vi.setConfig({ testTimeout: 20_000 });

// jsdom has no layout, so scrolling is a no-op; the router's scroll restoration calls it on navigation.
window.scrollTo = () => {};

// The API client builds absolute URLs from window.location.origin (jsdom: http://localhost:3000), and
// msw resolves the handlers' relative paths against the same document, so both sides agree.
beforeAll(() => server.listen({ onUnhandledRequest: "error" }));
afterEach(() => {
  cleanup();
  server.resetHandlers();
  window.localStorage.clear();
});
afterAll(() => server.close());

import { setupServer } from "msw/node";

/** One request interceptor for the whole client suite; each test installs its own handlers. */
export const server = setupServer();

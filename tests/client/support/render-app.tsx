import { render } from "@testing-library/react";
import userEvent from "@testing-library/user-event";
import { createMemoryRouter } from "react-router-dom";
import { AppProvider } from "@/app/provider";
import { createAppRoutes } from "@/app/router";
import { createQueryClient } from "@/lib/query-client";

/** Renders the real route tree in memory at `path`, with a fresh query cache that never retries. */
export function renderApp(path: string) {
  const queryClient = createQueryClient({ queries: { retry: false }, mutations: { retry: false } });
  const router = createMemoryRouter(createAppRoutes(queryClient), { initialEntries: [path] });
  // No pause between keystrokes: the tests wait on conditions, not on typing speed.
  const user = userEvent.setup({ delay: null });
  const view = render(<AppProvider queryClient={queryClient} router={router} />);
  return { ...view, router, queryClient, user };
}

import { type QueryClient, QueryClientProvider } from "@tanstack/react-query";
import { useEffect } from "react";
import type { createBrowserRouter } from "react-router-dom";
import { RouterProvider } from "react-router-dom";
import { authQueries } from "@/features/auth/api/auth-queries";
import { setCsrfTokenSource } from "@/lib/api-client";

type DataRouter = ReturnType<typeof createBrowserRouter>;

export function AppProvider({ queryClient, router }: { queryClient: QueryClient; router: DataRouter }) {
  useEffect(() => {
    // Mutations echo the session's CSRF token, read from the cached `GET /api/me` answer.
    setCsrfTokenSource(() => queryClient.getQueryData(authQueries.me().queryKey)?.csrfToken);
  }, [queryClient]);

  return (
    <QueryClientProvider client={queryClient}>
      <RouterProvider router={router} />
    </QueryClientProvider>
  );
}

import type { QueryClient } from "@tanstack/react-query";
import { createBrowserRouter, type RouteObject, redirect } from "react-router-dom";
import { paths } from "@/lib/paths";
import { AppShell } from "./layouts/app-shell";
import { AppSplash } from "./layouts/app-splash";
import { GroupLayout } from "./layouts/group-layout";
import { RootLayout } from "./layouts/root-layout";
import { createLoaders } from "./loaders";
import { RouteErrorBoundary } from "./routes/route-error-boundary";

// Page components load on demand so the first download carries only the frame; loaders stay in the
// main bundle so data and code are fetched side by side.
const pages = {
  signIn: async () => (await import("./routes/signin")).SignInRoute,
  landing: async () => (await import("./routes/landing")).LandingRoute,
  targets: async () => (await import("./routes/groups/targets")).TargetsRoute,
  target: async () => (await import("./routes/groups/targets")).TargetRoute,
  codes: async () => (await import("./routes/groups/codes")).CodesRoute,
  runs: async () => (await import("./routes/groups/runs")).RunsRoute,
  run: async () => (await import("./routes/groups/runs")).RunRoute,
  newRun: async () => (await import("./routes/groups/new-run")).NewRunRoute,
  studies: async () => (await import("./routes/groups/areas")).StudiesRoute,
  members: async () => (await import("./routes/groups/members")).MembersRoute,
  invitations: async () => (await import("./routes/groups/invitations")).InvitationsRoute,
  activity: async () => (await import("./routes/groups/activity")).ActivityRoute,
  runLink: async () => (await import("./routes/run-link")).RunLinkRoute,
  invitation: async () => (await import("./routes/invitation")).InvitationRoute,
  apiTokens: async () => (await import("./routes/settings/api-tokens")).ApiTokensRoute,
  adminGroups: async () => (await import("./routes/admin/groups")).AdminGroupsRoute,
  adminPeople: async () => (await import("./routes/admin/people")).AdminPeopleRoute,
  notFound: async () => (await import("./routes/not-found")).NotFoundRoute,
};

const errorElement = <RouteErrorBoundary />;

export function createAppRoutes(queryClient: QueryClient): RouteObject[] {
  const loaders = createLoaders(queryClient);
  return [
    {
      id: "root",
      Component: RootLayout,
      errorElement,
      hydrateFallbackElement: <AppSplash />,
      children: [
        { path: "signin", loader: loaders.signIn, lazy: { Component: pages.signIn }, errorElement },
        {
          id: "protected",
          loader: loaders.protected,
          Component: AppShell,
          errorElement,
          children: [
            {
              errorElement,
              children: [
                { index: true, loader: loaders.landing, lazy: { Component: pages.landing } },
                {
                  path: "groups/:groupId",
                  loader: loaders.group,
                  Component: GroupLayout,
                  children: [
                    {
                      errorElement,
                      children: [
                        { index: true, loader: ({ params }) => redirect(paths.group(params.groupId ?? "")) },
                        { path: "targets", lazy: { Component: pages.targets } },
                        { path: "targets/:targetId", lazy: { Component: pages.target } },
                        { path: "codes", lazy: { Component: pages.codes } },
                        { path: "runs", lazy: { Component: pages.runs } },
                        { path: "runs/new", lazy: { Component: pages.newRun } },
                        { path: "runs/:runId", lazy: { Component: pages.run } },
                        { path: "studies", lazy: { Component: pages.studies } },
                        { path: "members", loader: loaders.members, lazy: { Component: pages.members } },
                        {
                          path: "invitations",
                          loader: loaders.invitations,
                          lazy: { Component: pages.invitations },
                        },
                        { path: "activity", loader: loaders.activity, lazy: { Component: pages.activity } },
                        { path: "*", lazy: { Component: pages.notFound } },
                      ],
                    },
                  ],
                },
                // The address run e-mails link to; it opens the run in its group.
                { path: "runs/:runId", lazy: { Component: pages.runLink } },
                {
                  path: "invitations/:token",
                  loader: loaders.invitation,
                  lazy: { Component: pages.invitation },
                },
                { path: "settings", loader: () => redirect(paths.apiTokens()) },
                { path: "settings/tokens", loader: loaders.apiTokens, lazy: { Component: pages.apiTokens } },
                {
                  path: "admin",
                  loader: loaders.siteAdmin,
                  children: [
                    { index: true, loader: () => redirect(paths.adminGroups()) },
                    { path: "groups", loader: loaders.adminGroups, lazy: { Component: pages.adminGroups } },
                    { path: "people", loader: loaders.adminPeople, lazy: { Component: pages.adminPeople } },
                  ],
                },
                { path: "*", lazy: { Component: pages.notFound } },
              ],
            },
          ],
        },
      ],
    },
  ];
}

export function createAppRouter(queryClient: QueryClient) {
  return createBrowserRouter(createAppRoutes(queryClient));
}

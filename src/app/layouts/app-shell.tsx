import { Suspense, useState } from "react";
import { Outlet } from "react-router-dom";
import { PageSkeleton } from "@/components/ui/skeleton";
import { canManageGroup } from "@/lib/permissions";
import { AppHeader } from "./app-header";
import { ModelResultsNote } from "./model-results-note";
import { SidebarNav } from "./sidebar-nav";
import { useWorkspace } from "./use-workspace";

/** The signed-in frame: navigation on the left, group switcher and account in the header. */
export function AppShell() {
  const workspace = useWorkspace();
  const [menuOpen, setMenuOpen] = useState(false);
  const { me, activeGroupId } = workspace;
  const nav = {
    activeGroupId,
    canManageGroup: activeGroupId ? canManageGroup(me, activeGroupId) : false,
    isSiteAdmin: me.user.isSiteAdmin,
  };

  return (
    <div className="min-h-dvh bg-ink-50/60 lg:grid lg:grid-cols-[16rem_minmax(0,1fr)]">
      <a
        href="#main"
        className="sr-only z-50 rounded-md bg-white px-3 py-2 text-sm font-medium text-ink-900 focus:not-sr-only focus:fixed focus:top-3 focus:left-3"
      >
        Skip to content
      </a>
      <aside className="hidden lg:sticky lg:top-0 lg:block lg:h-dvh">
        <SidebarNav {...nav} />
      </aside>
      {menuOpen ? (
        <div
          role="dialog"
          aria-modal="true"
          aria-label="Menu"
          className="fixed inset-0 z-40 lg:hidden"
          onKeyDown={(event) => {
            if (event.key === "Escape") setMenuOpen(false);
          }}
        >
          <button
            type="button"
            aria-label="Close menu"
            className="absolute inset-0 bg-ink-950/50"
            onClick={() => setMenuOpen(false)}
          />
          <aside className="relative h-full w-72 shadow-xl">
            <SidebarNav {...nav} onNavigate={() => setMenuOpen(false)} />
          </aside>
        </div>
      ) : null}
      <div className="flex min-h-dvh min-w-0 flex-col">
        <AppHeader workspace={workspace} onOpenMenu={() => setMenuOpen(true)} />
        <main id="main" className="flex-1 px-4 py-8 sm:px-6 lg:px-10">
          <div className="mx-auto w-full max-w-6xl">
            <Suspense fallback={<PageSkeleton />}>
              <Outlet />
            </Suspense>
          </div>
        </main>
        <footer className="border-t border-ink-100 px-4 py-5 sm:px-6 lg:px-10">
          <ModelResultsNote className="mx-auto max-w-6xl" />
        </footer>
      </div>
    </div>
  );
}

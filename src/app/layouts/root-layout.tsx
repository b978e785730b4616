import { Outlet, ScrollRestoration, useNavigation } from "react-router-dom";
import { cn } from "@/lib/cn";

/** A thin bar along the top while a navigation waits for code or data. */
function NavigationProgress() {
  const navigation = useNavigation();
  const busy = navigation.state !== "idle";
  return (
    <div
      aria-hidden="true"
      className={cn(
        "pointer-events-none fixed inset-x-0 top-0 z-50 h-0.5 origin-left bg-flux-400 transition-transform duration-500",
        busy ? "scale-x-75" : "scale-x-0 duration-150",
      )}
    />
  );
}

export function RootLayout() {
  return (
    <>
      <NavigationProgress />
      <Outlet />
      <ScrollRestoration />
    </>
  );
}

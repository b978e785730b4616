import { useQuery } from "@tanstack/react-query";
import { cn } from "@/lib/cn";
import { healthQueries } from "../api/health-queries";

/** A quiet line in the sidebar: green when the server and its database answer, amber otherwise. */
export function HealthIndicator() {
  const health = useQuery(healthQueries.status());

  let label = "Checking service…";
  let tone = "bg-ink-500";
  if (health.isError) {
    label = "Service unreachable";
    tone = "bg-ember-500";
  } else if (health.data) {
    const ok = health.data.status === "ok" && health.data.database.ok;
    label = ok ? "All systems normal" : "Service degraded";
    tone = ok ? "bg-flux-400" : "bg-ember-500";
  }

  return (
    <p className="flex items-center gap-2 text-xs text-ink-400" title={health.data?.database.error}>
      <span aria-hidden="true" className={cn("size-2 rounded-full", tone)} />
      <span>{label}</span>
      {health.data ? <span className="ml-auto font-mono text-ink-500">v{health.data.version}</span> : null}
    </p>
  );
}

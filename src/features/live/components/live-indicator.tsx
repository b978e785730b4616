import { Badge } from "@/components/ui/badge";
import type { LiveStatus } from "../live-client";

const LABELS: Record<LiveStatus, string> = {
  connecting: "connecting…",
  live: "live",
  reconnecting: "reconnecting…",
};

/** Whether the page hears changes as they happen, or refreshes slowly while the feed is away. */
export function LiveIndicator({ status }: { status: LiveStatus }) {
  return (
    <span role="status" aria-label={`Updates: ${LABELS[status]}`}>
      <Badge tone={status === "live" ? "flux" : status === "reconnecting" ? "ember" : "muted"}>
        {LABELS[status]}
      </Badge>
    </span>
  );
}

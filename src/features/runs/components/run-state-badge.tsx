import type { RunState } from "@shared/schemas";
import { Badge, type BadgeTone } from "@/components/ui/badge";

const TONES: Record<RunState, BadgeTone> = {
  queued: "muted",
  staging: "flux",
  submitted: "flux",
  running: "flux",
  collecting: "flux",
  held: "ember",
  done: "ink",
  failed: "ember",
  cancelled: "neutral",
};

export function RunStateBadge({ state }: { state: RunState }) {
  return <Badge tone={TONES[state]}>{state}</Badge>;
}

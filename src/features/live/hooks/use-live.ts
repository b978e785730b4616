import type { RunSummary } from "@shared/schemas/runs";
import { useEffect, useRef, useState } from "react";
import type { LiveClient, LiveRunWatcher, LiveStatus } from "../live-client";
import { loadLiveClient } from "../load-live";

/**
 * Runs `use(client)` once the tab's live client is loaded and reports the connection's status; returns
 * the clean-up for an effect.
 */
function attach(
  use: (client: LiveClient) => () => void,
  setStatus: (status: LiveStatus) => void,
): () => void {
  let cleanUp: (() => void) | undefined;
  let cancelled = false;
  loadLiveClient().then(
    (client) => {
      if (cancelled) return;
      setStatus(client.status());
      const stopStatus = client.onStatus(setStatus);
      const stopUse = use(client);
      cleanUp = () => {
        stopStatus();
        stopUse();
      };
    },
    () => {
      // The chunk could not be loaded (offline, a new deployment): the page keeps its slow refresh.
      if (!cancelled) setStatus("reconnecting");
    },
  );
  return () => {
    cancelled = true;
    cleanUp?.();
  };
}

/** Follows a run's state and progress events (the latest `watcher` is called) and reports the connection. */
export function useLiveRun(runId: string, watcher: LiveRunWatcher): LiveStatus {
  const [status, setStatus] = useState<LiveStatus>("connecting");
  const latest = useRef(watcher);
  latest.current = watcher;
  useEffect(
    () =>
      attach(
        (client) =>
          client.watchRun(runId, {
            onState: (event) => latest.current.onState?.(event),
            onProgress: (event) => latest.current.onProgress?.(event),
          }),
        setStatus,
      ),
    [runId],
  );
  return status;
}

/** Follows a group's run summaries as they change (the latest `onRun` is called). */
export function useLiveGroup(groupId: string, onRun: (run: RunSummary) => void): LiveStatus {
  const [status, setStatus] = useState<LiveStatus>("connecting");
  const latest = useRef(onRun);
  latest.current = onRun;
  useEffect(
    () => attach((client) => client.watchGroup(groupId, (run) => latest.current(run)), setStatus),
    [groupId],
  );
  return status;
}

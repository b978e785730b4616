import { type FormEvent, useEffect, useRef, useState } from "react";
import { Button } from "@/components/ui/button";
import { Input } from "@/components/ui/input";
import { Notice } from "@/components/ui/notice";
import type { LiveLogHandle } from "../live-client";
import { loadLiveClient, loadTerminal } from "../load-live";
import { LogFlow } from "../log-flow";
import type { LogTerminal } from "../terminal/xterm-terminal";

/**
 * A run's log in a terminal, from its first byte and then live, exactly as the job wrote it (colours,
 * carriage returns). Following keeps the newest line in view; the search box finds text in what is held.
 * `hidden` keeps it out of view while it already follows the log (the page shows it once the feed is up).
 */
export function LiveRunLog({ runId, hidden = false }: { runId: string; hidden?: boolean }) {
  const container = useRef<HTMLDivElement>(null);
  const terminal = useRef<LogTerminal | null>(null);
  const [follow, setFollow] = useState(true);
  const [term, setTerm] = useState("");
  const [searchNote, setSearchNote] = useState<string | null>(null);
  const [problem, setProblem] = useState<string | null>(null);

  useEffect(() => {
    let cancelled = false;
    let cleanUp: (() => void) | undefined;
    Promise.all([loadLiveClient(), loadTerminal()]).then(
      ([client, createTerminal]) => {
        if (cancelled || !container.current) return;
        const view = createTerminal(container.current);
        terminal.current = view;
        const holder: { handle?: LiveLogHandle } = {};
        const flow = new LogFlow(view, () => holder.handle?.resume());
        holder.handle = client.followLog(runId, {
          onChunk: (chunk, ack) => flow.accept(chunk.data, ack),
          onPaused: () => flow.paused(),
          onRefused: setProblem,
        });
        cleanUp = () => {
          holder.handle?.stop();
          flow.dispose();
          view.dispose();
          terminal.current = null;
        };
      },
      () => {
        if (!cancelled) setProblem("The log viewer could not be loaded; reload the page to try again.");
      },
    );
    return () => {
      cancelled = true;
      cleanUp?.();
    };
  }, [runId]);

  const toggleFollow = () => {
    const next = !follow;
    setFollow(next);
    terminal.current?.setFollow(next);
  };

  const find = (direction: "next" | "previous") => {
    if (!terminal.current || term === "") return;
    setSearchNote(terminal.current.find(term, direction) ? null : `No “${term}” in the log so far.`);
  };
  const onSearch = (event: FormEvent) => {
    event.preventDefault();
    find("next");
  };

  return (
    <div className="flex flex-col gap-2" hidden={hidden}>
      <div className="flex flex-wrap items-center gap-2">
        <Button size="sm" variant="secondary" aria-pressed={follow} onClick={toggleFollow}>
          {follow ? "Pause following" : "Follow the log"}
        </Button>
        <form aria-label="Search the log" className="flex items-center gap-2" onSubmit={onSearch}>
          <Input
            type="search"
            aria-label="Text to find in the log"
            placeholder="Find in the log"
            className="h-8 w-56"
            maxLength={200}
            value={term}
            onChange={(event) => {
              setTerm(event.target.value);
              setSearchNote(null);
              if (event.target.value === "") terminal.current?.clearSearch();
            }}
          />
          <Button size="sm" variant="ghost" type="submit">
            Next
          </Button>
          <Button size="sm" variant="ghost" onClick={() => find("previous")}>
            Previous
          </Button>
        </form>
      </div>
      {searchNote ? (
        <p role="status" className="text-xs text-ink-600">
          {searchNote}
        </p>
      ) : null}
      {problem ? <Notice tone="error">{problem}</Notice> : null}
      <div
        ref={container}
        data-testid="live-log"
        className="h-96 overflow-hidden rounded-xl bg-[#14161c] p-2"
        role="log"
        aria-label="Run log"
      />
    </div>
  );
}

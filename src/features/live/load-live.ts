/**
 * The live feed's client and the log terminal are loaded on demand, each its own chunk: pages that never
 * show a live run download neither socket.io-client nor xterm.
 */
import type { LiveClient } from "./live-client";
import type { LogTerminal } from "./terminal/xterm-terminal";

let client: Promise<LiveClient> | null = null;

/** The tab's one live connection, opened on first use. */
export function loadLiveClient(): Promise<LiveClient> {
  client ??= import("./live-client").then(({ LiveClient }) => new LiveClient());
  return client;
}

/** Closes the tab's live connection; the next use opens a new one. */
export async function closeLiveClient(): Promise<void> {
  const held = client;
  client = null;
  (await held)?.close();
}

export async function loadTerminal(): Promise<(container: HTMLElement) => LogTerminal> {
  return (await import("./terminal/xterm-terminal")).createLogTerminal;
}

/**
 * The log terminal: @xterm/xterm with its fit and search add-ons, read-only. Kept in its own module,
 * loaded on demand (load-live.ts), so xterm stays out of the main bundle and tests (jsdom cannot render
 * xterm) can replace it. xterm decodes the UTF-8 bytes itself, across write boundaries.
 */
import { FitAddon } from "@xterm/addon-fit";
import { SearchAddon } from "@xterm/addon-search";
import { Terminal } from "@xterm/xterm";
import "@xterm/xterm/css/xterm.css";

/** Lines kept above the screen; the whole log is always at hand through the download link. */
const SCROLLBACK_LINES = 50_000;

export type LogTerminal = {
  /** Gives bytes to the terminal; `written` runs once it has processed them. */
  write: (data: Uint8Array, written: () => void) => void;
  /** Following: the view stays at the newest line as bytes arrive. */
  setFollow: (follow: boolean) => void;
  /** Selects the next (or previous) match of `term`; false when there is none. */
  find: (term: string, direction: "next" | "previous") => boolean;
  clearSearch: () => void;
  dispose: () => void;
};

export function createLogTerminal(container: HTMLElement): LogTerminal {
  const terminal = new Terminal({
    disableStdin: true,
    // Job logs end lines with \n alone; the terminal would otherwise not return to the first column.
    convertEol: true,
    scrollback: SCROLLBACK_LINES,
    fontSize: 12,
    cursorBlink: false,
    theme: { background: "#14161c" },
  });
  const fit = new FitAddon();
  const search = new SearchAddon();
  terminal.loadAddon(fit);
  terminal.loadAddon(search);
  terminal.open(container);
  fit.fit();
  const resize = new ResizeObserver(() => fit.fit());
  resize.observe(container);
  let follow = true;
  return {
    write(data, written) {
      terminal.write(data, () => {
        if (follow) terminal.scrollToBottom();
        written();
      });
    },
    setFollow(on) {
      follow = on;
      if (on) terminal.scrollToBottom();
    },
    find(term, direction) {
      return direction === "next" ? search.findNext(term) : search.findPrevious(term);
    },
    clearSearch() {
      search.clearDecorations();
      terminal.clearSelection();
    },
    dispose() {
      resize.disconnect();
      terminal.dispose();
    },
  };
}

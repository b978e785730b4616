/**
 * Stand-in for the log terminal (src/features/live/terminal/xterm-terminal.ts) in client tests: jsdom
 * cannot run xterm (no layout, media queries or ResizeObserver). It shows the bytes it is given as text
 * in its container and reports each write as processed at once. Tests that look closer at the terminal
 * (live-run.test.tsx) replace it with their own.
 */
import type { LogTerminal } from "@/features/live/terminal/xterm-terminal";

export function createLogTerminal(container: HTMLElement): LogTerminal {
  const decoder = new TextDecoder();
  let text = "";
  return {
    write(data, written) {
      text += decoder.decode(data, { stream: true });
      container.textContent = text;
      queueMicrotask(written);
    },
    setFollow() {},
    find: (term) => text.includes(term),
    clearSearch() {},
    dispose() {},
  };
}

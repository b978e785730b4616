import { useState } from "react";
import { Button } from "./button";

type CopyState = "idle" | "copied" | "failed";

/** A secret in a read-only monospace field with a copy button; focusing the field selects it for copying by hand. */
export function CopyableSecret({ value, label }: { value: string; label: string }) {
  const [copyState, setCopyState] = useState<CopyState>("idle");

  async function copy() {
    try {
      await navigator.clipboard.writeText(value);
      setCopyState("copied");
    } catch {
      setCopyState("failed");
    }
  }

  return (
    <div className="flex flex-col gap-2">
      <div className="flex items-stretch gap-2">
        <input
          readOnly
          value={value}
          aria-label={label}
          spellCheck={false}
          onFocus={(event) => event.currentTarget.select()}
          className="h-11 min-w-0 flex-1 rounded-lg border border-ink-700 bg-ink-950 px-3 font-mono text-sm text-flux-200"
        />
        <Button variant="secondary" onClick={copy}>
          {copyState === "copied" ? "Copied" : "Copy"}
        </Button>
      </div>
      <p aria-live="polite" className="text-xs text-ink-500">
        {copyState === "copied" ? "Copied to the clipboard." : null}
        {copyState === "failed" ? "The browser blocked copying: select the text and copy it by hand." : null}
      </p>
    </div>
  );
}

import { type KeyboardEvent, type RefObject, useEffect } from "react";

const FOCUSABLE =
  'button:not([disabled]), [href], input:not([disabled]), select:not([disabled]), textarea:not([disabled]), [tabindex]:not([tabindex="-1"])';

/**
 * Focus handling of a modal panel: focus moves to `initialFocus()` when it opens and back to what had it
 * when it closes; Tab and Shift+Tab stay inside the panel; Escape closes it unless an action is pending.
 * Returns the panel's key handler.
 */
export function useModalFocus({
  open = true,
  panelRef,
  initialFocus,
  pending,
  onClose,
}: {
  open?: boolean;
  panelRef: RefObject<HTMLElement | null>;
  initialFocus: () => HTMLElement | null | undefined;
  pending: boolean;
  onClose: () => void;
}) {
  // biome-ignore lint/correctness/useExhaustiveDependencies: focus moves once per opening, not per render
  useEffect(() => {
    if (!open) return;
    const previouslyFocused = document.activeElement instanceof HTMLElement ? document.activeElement : null;
    initialFocus()?.focus();
    return () => previouslyFocused?.focus();
  }, [open]);

  return function handleKeyDown(event: KeyboardEvent<HTMLElement>) {
    if (event.key === "Escape" && !pending) {
      event.stopPropagation();
      onClose();
      return;
    }
    if (event.key !== "Tab" || !panelRef.current) return;
    const focusable = Array.from(panelRef.current.querySelectorAll<HTMLElement>(FOCUSABLE));
    const first = focusable[0];
    const last = focusable[focusable.length - 1];
    if (!first || !last) return;
    if (event.shiftKey && document.activeElement === first) {
      event.preventDefault();
      last.focus();
    } else if (!event.shiftKey && document.activeElement === last) {
      event.preventDefault();
      first.focus();
    }
  };
}

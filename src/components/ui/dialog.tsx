import { type ReactNode, useId, useRef } from "react";
import { createPortal } from "react-dom";
import { describeError } from "@/lib/describe-error";
import { Button } from "./button";
import { Notice } from "./notice";
import { useModalFocus } from "./use-modal-focus";

type ConfirmDialogProps = {
  open: boolean;
  title: string;
  children?: ReactNode;
  confirmLabel: string;
  cancelLabel?: string;
  tone?: "danger" | "primary";
  pending?: boolean;
  /** A failure of the confirmed action, shown inside the dialog so the person can decide again. */
  error?: unknown;
  onConfirm: () => void;
  onClose: () => void;
};

/** A modal question with a safe default: focus starts on Cancel and Escape backs out. */
export function ConfirmDialog({
  open,
  title,
  children,
  confirmLabel,
  cancelLabel = "Cancel",
  tone = "danger",
  pending = false,
  error,
  onConfirm,
  onClose,
}: ConfirmDialogProps) {
  const titleId = useId();
  const descriptionId = useId();
  const panelRef = useRef<HTMLDivElement>(null);
  const cancelRef = useRef<HTMLButtonElement>(null);

  const handleKeyDown = useModalFocus({
    open,
    panelRef,
    initialFocus: () => cancelRef.current,
    pending,
    onClose,
  });

  if (!open) return null;

  return createPortal(
    <div className="fixed inset-0 z-50 flex items-center justify-center p-4">
      <div
        aria-hidden="true"
        className="absolute inset-0 bg-ink-950/50 backdrop-blur-[2px]"
        onClick={pending ? undefined : onClose}
      />
      <div
        ref={panelRef}
        role="dialog"
        aria-modal="true"
        aria-labelledby={titleId}
        aria-describedby={children ? descriptionId : undefined}
        onKeyDown={handleKeyDown}
        className="relative w-full max-w-md rounded-2xl border border-ink-100 bg-white p-6 shadow-xl"
      >
        <h2 id={titleId} className="text-lg font-semibold text-ink-950">
          {title}
        </h2>
        {children ? (
          <div id={descriptionId} className="mt-2 text-sm text-ink-600">
            {children}
          </div>
        ) : null}
        {error ? (
          <Notice tone="error" className="mt-4">
            {describeError(error).message}
          </Notice>
        ) : null}
        <div className="mt-6 flex justify-end gap-2">
          <Button ref={cancelRef} variant="secondary" onClick={onClose} disabled={pending}>
            {cancelLabel}
          </Button>
          <Button variant={tone} onClick={onConfirm} pending={pending}>
            {confirmLabel}
          </Button>
        </div>
      </div>
    </div>,
    document.body,
  );
}

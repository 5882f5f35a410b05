"use client";
import * as Dialog from "@radix-ui/react-dialog";
import type { ReactNode } from "react";

/** The board's dialogs: Radix Dialog (focus trap, Escape, labelled) with our frame. */
export function DialogShell({
  open,
  onOpenChange,
  title,
  description,
  children,
  wide = false,
  testId,
}: {
  open: boolean;
  onOpenChange: (open: boolean) => void;
  title: string;
  description?: ReactNode;
  children: ReactNode;
  wide?: boolean;
  testId?: string;
}) {
  return (
    <Dialog.Root open={open} onOpenChange={onOpenChange}>
      <Dialog.Portal>
        <Dialog.Overlay className="fixed inset-0 z-40 bg-slate-900/40" />
        <Dialog.Content
          data-testid={testId}
          className={`fixed left-1/2 top-1/2 z-50 max-h-[90vh] w-[calc(100vw-2rem)] -translate-x-1/2 -translate-y-1/2 overflow-y-auto rounded-lg bg-white p-5 shadow-xl focus:outline-none ${wide ? "max-w-2xl" : "max-w-lg"}`}
        >
          <div className="flex items-start justify-between gap-4">
            <Dialog.Title className="text-lg font-semibold">{title}</Dialog.Title>
            <Dialog.Close className="rounded px-2 py-0.5 text-slate-500 hover:bg-slate-100" aria-label="Close">
              ✕
            </Dialog.Close>
          </div>
          {description ? (
            <Dialog.Description className="mt-1 text-sm text-slate-600">{description}</Dialog.Description>
          ) : (
            <Dialog.Description className="sr-only">{title}</Dialog.Description>
          )}
          <div className="mt-4">{children}</div>
        </Dialog.Content>
      </Dialog.Portal>
    </Dialog.Root>
  );
}

export function FieldError({ id, messages }: { id: string; messages?: string[] }) {
  if (!messages?.length) return null;
  return (
    <p id={id} className="mt-1 text-xs text-danger-700" role="alert">
      {messages.join(" ")}
    </p>
  );
}

export function Caution({ children, testId }: { children: ReactNode; testId?: string }) {
  return (
    <p data-testid={testId} className="mt-1 rounded border border-caution-500/40 bg-caution-50 px-2 py-1 text-xs text-caution-700" role="note">
      <span aria-hidden="true">⚠ </span>
      {children}
    </p>
  );
}

export function FormError({ message }: { message: string | null }) {
  if (!message) return null;
  return (
    <p className="mb-3 rounded border border-danger-600/30 bg-danger-50 px-3 py-2 text-sm text-danger-700" role="alert" data-testid="form-error">
      {message}
    </p>
  );
}

export function DialogButtons({
  onCancel,
  submitLabel,
  busy,
  extra,
}: {
  onCancel: () => void;
  submitLabel: string;
  busy: boolean;
  extra?: ReactNode;
}) {
  return (
    <div className="mt-5 flex flex-wrap items-center justify-between gap-2">
      <div>{extra}</div>
      <div className="flex gap-2">
        <button type="button" onClick={onCancel} className="rounded-md px-3 py-1.5 text-sm ring-1 ring-slate-300 hover:bg-slate-50">
          Cancel
        </button>
        <button
          type="submit"
          disabled={busy}
          className="rounded-md bg-accent-600 px-3 py-1.5 text-sm font-medium text-white hover:bg-accent-700 disabled:opacity-60"
        >
          {busy ? "Saving…" : submitLabel}
        </button>
      </div>
    </div>
  );
}

export const inputClass = "mt-1 w-full rounded-md border border-slate-300 px-2.5 py-1.5 text-sm aria-[invalid=true]:border-danger-600";
export const labelClass = "block text-sm font-medium text-slate-700";

"use client";
export { DialogShell } from "@/components/ui/dialog-shell";
import type { ReactNode } from "react";

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

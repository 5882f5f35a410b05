"use client";
import { DialogShell } from "@/components/ui/dialog-shell";
import { useEffect, useState, type ReactNode } from "react";
import { ApiError } from "@/lib/fetcher";

// Small pieces shared by the history, activity and backup screens.

export const buttonClass =
  "inline-flex items-center justify-center gap-1 rounded-md px-3 py-1.5 text-sm font-medium ring-1 ring-slate-300 hover:bg-slate-50 disabled:opacity-50";
export const primaryButtonClass =
  "inline-flex items-center justify-center gap-1 rounded-md bg-accent-600 px-3 py-1.5 text-sm font-medium text-white hover:bg-accent-700 disabled:opacity-60";
export const dangerButtonClass =
  "inline-flex items-center justify-center gap-1 rounded-md px-3 py-1.5 text-sm font-medium text-danger-700 ring-1 ring-danger-600/40 hover:bg-danger-50 disabled:opacity-50";
export const inputClass = "mt-1 w-full rounded-md border border-slate-300 px-2.5 py-1.5 text-sm";
export const labelClass = "block text-xs font-medium uppercase tracking-wide text-slate-500";

export function errorText(error: unknown): string {
  if (error instanceof ApiError) return error.message;
  if (error instanceof Error) return error.message;
  return "Something went wrong. Nothing was changed.";
}

export function Badge({ tone = "neutral", children, testId }: { tone?: "neutral" | "accent" | "caution" | "danger"; children: ReactNode; testId?: string }) {
  const tones = {
    neutral: "bg-slate-100 text-slate-700",
    accent: "bg-accent-50 text-accent-700",
    caution: "bg-caution-50 text-caution-700",
    danger: "bg-danger-50 text-danger-700",
  };
  return (
    <span data-testid={testId} className={`inline-flex items-center whitespace-nowrap rounded px-1.5 py-0.5 text-xs font-medium ${tones[tone]}`}>
      {children}
    </span>
  );
}

export function Notice({ tone, children, testId, onDismiss }: { tone: "ok" | "error" | "caution"; children: ReactNode; testId?: string; onDismiss?: () => void }) {
  const tones = {
    ok: "border-accent-500/30 bg-accent-50 text-accent-700",
    error: "border-danger-600/30 bg-danger-50 text-danger-700",
    caution: "border-caution-500/40 bg-caution-50 text-caution-700",
  };
  return (
    <div role={tone === "error" ? "alert" : "status"} data-testid={testId} className={`flex items-start justify-between gap-3 rounded-md border px-3 py-2 text-sm ${tones[tone]}`}>
      <div>{children}</div>
      {onDismiss ? (
        <button type="button" onClick={onDismiss} className="rounded px-1 text-xs hover:underline">
          Dismiss
        </button>
      ) : null}
    </div>
  );
}

/** A time in the viewer's own time zone; UTC until the browser takes over (no hydration mismatch). */
export function LocalTime({ iso, withSeconds = false }: { iso: string; withSeconds?: boolean }) {
  const [text, setText] = useState(`${iso.slice(0, 16).replace("T", " ")} UTC`);
  useEffect(() => {
    setText(
      new Date(iso).toLocaleString(undefined, {
        year: "numeric",
        month: "short",
        day: "numeric",
        hour: "2-digit",
        minute: "2-digit",
        ...(withSeconds ? { second: "2-digit" } : {}),
      }),
    );
  }, [iso, withSeconds]);
  return (
    <time dateTime={iso} title={iso}>
      {text}
    </time>
  );
}

export function HistoryDialog(props: {
  open: boolean;
  onOpenChange: (open: boolean) => void;
  title: string;
  description?: ReactNode;
  children: ReactNode;
  testId?: string;
}) {
  return <DialogShell wide {...props} />;
}

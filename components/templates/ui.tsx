"use client";
import type { ReactNode } from "react";
import { ApiError } from "@/lib/fetcher";

// Small pieces shared by the template screens.

export const buttonClass =
  "inline-flex items-center justify-center gap-1 rounded-md px-3 py-1.5 text-sm font-medium ring-1 ring-slate-300 hover:bg-slate-50 disabled:opacity-50";
export const primaryButtonClass =
  "inline-flex items-center justify-center gap-1 rounded-md bg-accent-600 px-3 py-1.5 text-sm font-medium text-white hover:bg-accent-700 disabled:opacity-60";
export const dangerButtonClass =
  "inline-flex items-center justify-center gap-1 rounded-md px-3 py-1.5 text-sm font-medium text-danger-700 ring-1 ring-danger-600/40 hover:bg-danger-50 disabled:opacity-50";

export function errorText(error: unknown): string {
  if (error instanceof ApiError) return error.message;
  if (error instanceof Error) return error.message;
  return "Something went wrong. Nothing was changed.";
}

export function fieldErrorsOf(error: unknown): Record<string, string[]> {
  return error instanceof ApiError && error.fieldErrors ? error.fieldErrors : {};
}

export function Badge({ tone = "neutral", children }: { tone?: "neutral" | "accent" | "caution" | "danger"; children: ReactNode }) {
  const tones = {
    neutral: "bg-slate-100 text-slate-700",
    accent: "bg-accent-50 text-accent-700",
    caution: "bg-caution-50 text-caution-700",
    danger: "bg-danger-50 text-danger-700",
  };
  return <span className={`inline-flex items-center rounded px-1.5 py-0.5 text-xs font-medium ${tones[tone]}`}>{children}</span>;
}

export function Notice({ tone, children, testId }: { tone: "ok" | "error"; children: ReactNode; testId?: string }) {
  return (
    <div
      role={tone === "error" ? "alert" : "status"}
      data-testid={testId}
      className={`rounded-md border px-3 py-2 text-sm ${
        tone === "error" ? "border-danger-600/30 bg-danger-50 text-danger-700" : "border-accent-500/30 bg-accent-50 text-accent-700"
      }`}
    >
      {children}
    </div>
  );
}

import type { DriftState } from "@/lib/fleet/drift";

// Small, colour-plus-text badges (never colour alone) for push target states
// and drift states. Pure: usable from server and client components.

const tone = {
  good: "bg-accent-50 text-accent-700 ring-accent-600/30",
  moving: "bg-sky-50 text-sky-800 ring-sky-600/30",
  waiting: "bg-slate-100 text-slate-700 ring-slate-400/40",
  warn: "bg-caution-50 text-caution-700 ring-caution-500/40",
  bad: "bg-danger-50 text-danger-700 ring-danger-600/30",
} as const;

const targetTone: Record<string, keyof typeof tone> = {
  queued: "waiting",
  sending: "moving",
  awaiting_report: "moving",
  applied: "good",
  failed: "bad",
  superseded: "waiting",
  cancelled: "waiting",
};

const targetText: Record<string, string> = {
  queued: "Queued",
  sending: "Sending",
  awaiting_report: "Awaiting report",
  applied: "Applied",
  failed: "Failed",
  superseded: "Superseded",
  cancelled: "Cancelled",
};

export function TargetStateBadge({ state, label }: { state: string; label?: string }) {
  return (
    <span
      data-testid="target-state"
      data-state={state}
      className={`inline-flex items-center gap-1 whitespace-nowrap rounded-full px-2 py-0.5 text-xs font-medium ring-1 ring-inset ${tone[targetTone[state] ?? "waiting"]}`}
    >
      {state === "sending" || state === "awaiting_report" ? <span aria-hidden="true" className="h-1.5 w-1.5 animate-pulse rounded-full bg-current" /> : null}
      {label ?? targetText[state] ?? state}
    </span>
  );
}

const driftTone: Record<DriftState, keyof typeof tone> = {
  in_sync: "good",
  pending: "moving",
  drifted: "warn",
  offline: "bad",
  never_reported: "waiting",
  no_device: "waiting",
};

export const driftText: Record<DriftState, string> = {
  in_sync: "In sync",
  pending: "Pending",
  drifted: "Drifted",
  offline: "Offline",
  never_reported: "Never reported",
  no_device: "No device",
};

const driftIcon: Record<DriftState, string> = {
  in_sync: "✓",
  pending: "…",
  drifted: "≠",
  offline: "⨯",
  never_reported: "?",
  no_device: "–",
};

export function DriftStateBadge({ state, count }: { state: DriftState; count?: number }) {
  return (
    <span
      data-testid="drift-state"
      data-state={state}
      className={`inline-flex items-center gap-1 whitespace-nowrap rounded-full px-2 py-0.5 text-xs font-medium ring-1 ring-inset ${tone[driftTone[state]]}`}
    >
      <span aria-hidden="true">{driftIcon[state]}</span>
      {count !== undefined ? `${count} ${driftText[state].toLowerCase()}` : driftText[state]}
    </span>
  );
}

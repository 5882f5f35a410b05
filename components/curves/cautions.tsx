import type { ReactNode } from "react";

// Safety notes shown beside settings that can hurt someone (hearing,
// speakers, installation). Wording is ours; the hearing figure is NIOSH's
// recommended exposure limit (85 dBA as an 8-hour time-weighted average,
// NIOSH Criteria for a Recommended Standard: Occupational Noise Exposure,
// 1998). Rules of thumb are labelled as such, never as sourced facts.

export const HEARING_CAUTION =
  "Sustained levels above about 85 dBA carry a risk of hearing damage (NIOSH recommended exposure limit: 85 dBA averaged over 8 hours). Large boosts and high subwoofer levels also stress speakers and amplifiers.";

export const INSTALLATION_CAUTION =
  "Installation wiring, mounting and mains work follow local codes and licensed practice.";

/** A boost above this gets a caution (common practice, no single source). */
export const LARGE_BOOST_DB = 6;

export function Caution({ title, children, testId }: { title?: string; children: ReactNode; testId?: string }) {
  return (
    <div role="note" data-testid={testId} className="rounded-md border border-caution-500/40 bg-caution-50 px-3 py-2 text-sm text-caution-700">
      {title ? <p className="font-medium">{title}</p> : null}
      <div className={title ? "mt-0.5" : undefined}>{children}</div>
    </div>
  );
}

export function RuleOfThumb({ children }: { children: ReactNode }) {
  return (
    <p className="text-sm text-slate-600">
      <span className="mr-1 rounded bg-slate-100 px-1.5 py-0.5 text-xs font-medium text-slate-700">Common practice, no single source</span>
      {children}
    </p>
  );
}

export function ErrorNotice({ children, testId, onRetry }: { children: ReactNode; testId?: string; onRetry?: () => void }) {
  return (
    <div role="alert" data-testid={testId} className="flex flex-wrap items-center justify-between gap-3 rounded-md border border-danger-600/30 bg-danger-50 px-3 py-2 text-sm text-danger-700">
      <div>{children}</div>
      {onRetry ? (
        <button type="button" onClick={onRetry} className="rounded-md bg-white px-3 py-1 ring-1 ring-danger-600/40">
          Retry
        </button>
      ) : null}
    </div>
  );
}

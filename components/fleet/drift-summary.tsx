import type { DriftState } from "@/lib/fleet/drift";
import { DriftStateBadge } from "./status-badges";

// A home's zones by drift state, most urgent first, e.g. "1 drifted · 3 in sync".
const order: DriftState[] = ["drifted", "offline", "pending", "never_reported", "in_sync", "no_device"];

export function DriftSummary({ counts }: { counts: Record<DriftState, number> | undefined }) {
  if (!counts) return null;
  const shown = order.filter((s) => counts[s] > 0);
  if (shown.length === 0) return <span className="text-slate-500">—</span>;
  return (
    <span className="flex flex-wrap gap-1" data-testid="drift-summary">
      {shown.map((s) => (
        <DriftStateBadge key={s} state={s} count={counts[s]} />
      ))}
    </span>
  );
}

import Link from "next/link";
import type { HomeZoneHistoryDto } from "@/db/queries/history";
import { EmptyState } from "@/components/ui/empty-state";

// The zones of a home with a link to each one's revisions — deleted zones too,
// for those allowed to read them, so their history is never lost from view.

export function HomeZoneHistories({ zones }: { zones: HomeZoneHistoryDto[] }) {
  if (zones.length === 0) return <div className="mt-4"><EmptyState title="No zones in this home yet." /></div>;
  return (
    <section aria-labelledby="zone-histories-heading" className="mt-6">
      <h2 id="zone-histories-heading" className="text-lg font-semibold">Zone histories</h2>
      <ul className="mt-2 grid gap-3 sm:grid-cols-2 lg:grid-cols-3" data-testid="zone-histories">
        {zones.map((z) => (
          <li key={z.id} className={`rounded-lg border bg-white p-3 text-sm ${z.deletedAt ? "border-dashed border-slate-300" : "border-slate-200"}`}>
            <Link href={`/zones/${z.id}/history`} className="font-medium text-accent-700 hover:underline">
              {z.name}
            </Link>
            {z.deletedAt ? <span className="ml-2 rounded bg-slate-100 px-1.5 py-0.5 text-xs text-slate-600">deleted</span> : null}
            <p className="text-slate-600">
              {z.revisionCount} revision{z.revisionCount === 1 ? "" : "s"}
              {z.lastChangeAt ? ` · last ${new Date(z.lastChangeAt).toISOString().slice(0, 10)}` : ""}
            </p>
          </li>
        ))}
      </ul>
    </section>
  );
}

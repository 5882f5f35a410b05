"use client";
import Link from "next/link";
import { useState } from "react";
import useSWR from "swr";
import type { PushListDto, TargetCounts } from "@/db/queries/pushes";
import type { ApiError } from "@/lib/fetcher";
import { pushListUrl } from "@/lib/validation/pushes";

// The push history: who, when, scope and counts by state. Polls while any push runs.

const countOrder: { key: keyof TargetCounts; label: string; className: string }[] = [
  { key: "applied", label: "applied", className: "text-accent-700" },
  { key: "failed", label: "failed", className: "text-danger-700 font-medium" },
  { key: "sending", label: "sending", className: "text-sky-800" },
  { key: "awaiting_report", label: "awaiting report", className: "text-sky-800" },
  { key: "queued", label: "queued", className: "text-slate-600" },
  { key: "superseded", label: "superseded", className: "text-slate-600" },
  { key: "cancelled", label: "cancelled", className: "text-slate-600" },
];

export function CountsLine({ counts }: { counts: TargetCounts }) {
  const parts = countOrder.filter((c) => counts[c.key] > 0);
  if (parts.length === 0) return <span className="text-slate-500">no targets</span>;
  return (
    <span className="flex flex-wrap gap-x-3 gap-y-0.5">
      {parts.map((c) => (
        <span key={c.key} className={`whitespace-nowrap tabular-nums ${c.className}`}>
          {counts[c.key]} {c.label}
        </span>
      ))}
    </span>
  );
}

function ProgressBar({ counts, total }: { counts: TargetCounts; total: number }) {
  if (total === 0) return null;
  const done = counts.applied + counts.failed + counts.superseded + counts.cancelled;
  const pct = (n: number) => `${(n / total) * 100}%`;
  return (
    <div className="mt-1 flex h-1.5 w-full overflow-hidden rounded-full bg-slate-100" role="progressbar" aria-valuemin={0} aria-valuemax={total} aria-valuenow={done} aria-label="Targets finished">
      <div className="bg-accent-500" style={{ width: pct(counts.applied) }} />
      <div className="bg-danger-600" style={{ width: pct(counts.failed) }} />
      <div className="bg-slate-400" style={{ width: pct(counts.superseded + counts.cancelled) }} />
    </div>
  );
}

const statusText = { running: "Running", finished: "Finished", cancelled: "Cancelled" } as const;

export function PushList() {
  const [page, setPage] = useState(1);
  // A plain number so SWR re-arms its timer when it changes (see push-detail.tsx).
  const [live, setLive] = useState(true);
  const { data, error, mutate, isLoading } = useSWR<PushListDto, ApiError>(pushListUrl(page), {
    keepPreviousData: true,
    refreshInterval: live ? 2000 : 0,
    onSuccess: (d) => setLive(d.anyRunning),
  });
  const pages = data ? Math.max(1, Math.ceil(data.total / data.pageSize)) : 1;
  return (
    <section className="mt-6 rounded-lg border border-slate-200 bg-white shadow-sm">
      <h2 className="border-b border-slate-200 px-4 py-3 font-semibold">History</h2>
      {error ? (
        <div role="alert" className="flex items-center justify-between gap-3 bg-danger-50 p-4 text-sm text-danger-700">
          <span>Pushes could not be loaded: {error.message}</span>
          <button onClick={() => mutate()} className="rounded-md bg-white px-3 py-1 ring-1 ring-danger-600/40">
            Retry
          </button>
        </div>
      ) : null}
      <div className="overflow-x-auto">
        <table className="w-full text-left text-sm" data-testid="pushes-table">
          <thead className="bg-slate-50 text-xs uppercase tracking-wide text-slate-500">
            <tr>
              <th scope="col" className="px-4 py-2">Scope</th>
              <th scope="col" className="px-4 py-2">Started by</th>
              <th scope="col" className="px-4 py-2">When</th>
              <th scope="col" className="px-4 py-2">Status</th>
              <th scope="col" className="px-4 py-2">Targets</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-slate-100">
            {isLoading && !data ? (
              <tr>
                <td colSpan={5} className="px-4 py-8 text-center text-slate-500" role="status">
                  Loading pushes…
                </td>
              </tr>
            ) : data && data.items.length === 0 ? (
              <tr>
                <td colSpan={5} className="px-4 py-10 text-center text-slate-500">
                  Nothing has been pushed yet. Start a push above, or from a zone’s drift badge on a home’s board.
                </td>
              </tr>
            ) : (
              data?.items.map((p) => (
                <tr key={p.id} className="hover:bg-slate-50">
                  <td className="px-4 py-2">
                    <Link href={`/pushes/${p.id}`} className="font-medium text-accent-700 hover:underline">
                      {p.scopeLabel}
                    </Link>
                    <span className="ml-2 text-xs text-slate-500">{p.scopeKind}</span>
                  </td>
                  <td className="px-4 py-2">{p.createdBy ?? "—"}</td>
                  <td className="px-4 py-2 text-slate-600">
                    <time dateTime={p.createdAt}>{new Date(p.createdAt).toLocaleString("en-GB", { dateStyle: "medium", timeStyle: "short" })}</time>
                  </td>
                  <td className="px-4 py-2">{statusText[p.status]}</td>
                  <td className="min-w-56 px-4 py-2">
                    <CountsLine counts={p.counts} />
                    <ProgressBar counts={p.counts} total={p.total} />
                  </td>
                </tr>
              ))
            )}
          </tbody>
        </table>
      </div>
      <div className="flex items-center justify-between border-t border-slate-200 p-3 text-sm">
        <span className="text-slate-500">
          Page {page} of {pages}
        </span>
        <div className="flex gap-2">
          <button type="button" disabled={page <= 1} onClick={() => setPage((p) => p - 1)} className="rounded-md px-3 py-1 ring-1 ring-slate-300 disabled:opacity-40">
            Previous
          </button>
          <button type="button" disabled={page >= pages} onClick={() => setPage((p) => p + 1)} className="rounded-md px-3 py-1 ring-1 ring-slate-300 disabled:opacity-40">
            Next
          </button>
        </div>
      </div>
    </section>
  );
}

"use client";
import Link from "next/link";
import { useState } from "react";
import useSWR from "swr";
import type { PushDetailDto } from "@/db/queries/pushes";
import { ApiError, sendJson } from "@/lib/fetcher";
import { pushDetailUrl, pushTargetStateNames } from "@/lib/validation/pushes";
import { TargetStateBadge } from "@/components/fleet/status-badges";
import { CountsLine } from "./push-list";

// One push, live: per-target state (SWR polling while it runs), with retry of
// failed targets and cancelling of those not sent yet.

const filterLabels: Record<(typeof pushTargetStateNames)[number], string> = {
  queued: "Queued",
  sending: "Sending",
  awaiting_report: "Awaiting report",
  applied: "Applied",
  failed: "Failed",
  superseded: "Superseded",
  cancelled: "Cancelled",
};

export function PushDetail({ pushId }: { pushId: string }) {
  const [state, setState] = useState<(typeof pushTargetStateNames)[number] | "">("");
  const [page, setPage] = useState(1);
  const [busy, setBusy] = useState<"retry" | "cancel" | null>(null);
  const [message, setMessage] = useState<{ kind: "ok" | "error"; text: string } | null>(null);
  const url = pushDetailUrl(pushId, { state: state || undefined, page });
  // Poll while the push runs. A plain number (not a function of the data): SWR re-arms its
  // timer when the number changes, e.g. when "Retry failed" starts the push again.
  const [live, setLive] = useState(true);
  const { data, error, mutate } = useSWR<PushDetailDto, ApiError>(url, {
    keepPreviousData: true,
    refreshInterval: live ? 1000 : 0,
    onSuccess: (d) => setLive(d.status === "running"),
  });

  async function act(kind: "retry" | "cancel") {
    setBusy(kind);
    setMessage(null);
    try {
      const result = await sendJson<{ retried?: number; cancelled?: number }>(`/api/pushes/${pushId}/${kind === "retry" ? "retry-failed" : "cancel"}`, "POST");
      setMessage({
        kind: "ok",
        text: kind === "retry" ? `${result.retried} failed target(s) sent again.` : `${result.cancelled} pending target(s) cancelled.`,
      });
      setLive(true);
      await mutate();
    } catch (e) {
      setMessage({ kind: "error", text: e instanceof Error ? e.message : String(e) });
    } finally {
      setBusy(null);
    }
  }

  if (error && !data) {
    return (
      <div role="alert" className="mt-4 rounded-lg bg-danger-50 p-4 text-sm text-danger-700">
        This push could not be loaded: {error.message}{" "}
        <button onClick={() => mutate()} className="ml-2 underline">
          Retry
        </button>
      </div>
    );
  }
  if (!data) return <p role="status" className="mt-4 text-slate-500">Loading the push…</p>;
  const pages = Math.max(1, Math.ceil(data.filteredTotal / data.pageSize));
  return (
    <div>
      <nav className="text-sm text-slate-500">
        <Link href="/pushes" className="hover:underline">
          Pushes
        </Link>{" "}
        / {data.scopeLabel}
      </nav>
      <div className="mt-1 flex flex-wrap items-start justify-between gap-3">
        <div>
          <h1 className="text-2xl font-semibold">{data.scopeLabel}</h1>
          <p className="text-sm text-slate-600">
            {data.createdBy ?? "Someone"} started it {new Date(data.createdAt).toLocaleString("en-GB", { dateStyle: "medium", timeStyle: "medium" })}
            {data.finishedAt ? ` · finished ${new Date(data.finishedAt).toLocaleTimeString("en-GB")}` : ""}
          </p>
        </div>
        <div className="flex gap-2">
          {data.canCancel ? (
            <button
              type="button"
              onClick={() => act("cancel")}
              disabled={busy !== null}
              className="rounded-md px-3 py-1.5 text-sm ring-1 ring-slate-300 hover:bg-slate-50 disabled:opacity-50"
            >
              {busy === "cancel" ? "Cancelling…" : `Cancel ${data.counts.queued} pending`}
            </button>
          ) : null}
          {data.canRetry ? (
            <button
              type="button"
              onClick={() => act("retry")}
              disabled={busy !== null}
              className="rounded-md bg-accent-600 px-3 py-1.5 text-sm font-medium text-white hover:bg-accent-700 disabled:opacity-50"
            >
              {busy === "retry" ? "Retrying…" : `Retry ${data.counts.failed} failed`}
            </button>
          ) : null}
        </div>
      </div>

      <div className="mt-4 rounded-lg border border-slate-200 bg-white p-4 shadow-sm" aria-live="polite">
        <p className="text-sm font-medium" data-testid="push-status" data-status={data.status}>
          {data.status === "running" ? "Running — this page follows it live." : data.status === "finished" ? "Finished." : "Cancelled."}{" "}
          <span className="font-normal text-slate-600">
            {data.total} target{data.total === 1 ? "" : "s"}
          </span>
        </p>
        <div className="mt-1 text-sm">
          <CountsLine counts={data.counts} />
        </div>
      </div>
      {message ? (
        <p role={message.kind === "error" ? "alert" : "status"} className={`mt-3 text-sm ${message.kind === "error" ? "text-danger-700" : "text-accent-700"}`}>
          {message.text}
        </p>
      ) : null}

      <section className="mt-4 rounded-lg border border-slate-200 bg-white shadow-sm">
        <div className="flex flex-wrap items-center gap-3 border-b border-slate-200 p-3">
          <label className="text-sm">
            Show{" "}
            <select
              value={state}
              onChange={(e) => {
                setState(e.target.value as typeof state);
                setPage(1);
              }}
              className="rounded-md border border-slate-300 px-2 py-1"
            >
              <option value="">every target</option>
              {pushTargetStateNames.map((s) => (
                <option key={s} value={s}>
                  {filterLabels[s]} ({data.counts[s]})
                </option>
              ))}
            </select>
          </label>
        </div>
        <div className="overflow-x-auto">
          <table className="w-full text-left text-sm" data-testid="targets-table">
            <thead className="bg-slate-50 text-xs uppercase tracking-wide text-slate-500">
              <tr>
                <th scope="col" className="px-4 py-2">Zone</th>
                <th scope="col" className="px-4 py-2">Device</th>
                <th scope="col" className="px-4 py-2">Revision</th>
                <th scope="col" className="px-4 py-2">State</th>
                <th scope="col" className="px-4 py-2 text-right">Attempts</th>
                <th scope="col" className="px-4 py-2">Detail</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-slate-100">
              {data.targets.length === 0 ? (
                <tr>
                  <td colSpan={6} className="px-4 py-8 text-center text-slate-500">
                    No target in this state.
                  </td>
                </tr>
              ) : (
                data.targets.map((t) => (
                  <tr key={t.id} data-testid="target-row" data-zone={t.zoneName}>
                    <td className="px-4 py-2">
                      <span className="font-medium">{t.zoneName}</span> <span className="text-slate-500">· {t.homeName}</span>
                    </td>
                    <td className="px-4 py-2">
                      <Link href={`/devices/${t.deviceId}`} className="text-accent-700 hover:underline">
                        {t.deviceSerial}
                      </Link>
                    </td>
                    <td className="px-4 py-2 tabular-nums">{t.revisionNumber}</td>
                    <td className="px-4 py-2">
                      <TargetStateBadge state={t.state} label={t.stateLabel} />
                    </td>
                    <td className="px-4 py-2 text-right tabular-nums">{t.attempts}</td>
                    <td className="max-w-md px-4 py-2 text-slate-600">
                      {t.lastError ? <span className={t.state === "failed" ? "text-danger-700" : ""}>{t.lastError}</span> : null}
                      {t.state === "applied" && t.appliedAt ? `Reported ${new Date(t.appliedAt).toLocaleTimeString("en-GB")}` : null}
                      {t.desiredVersion !== null && t.state === "awaiting_report" ? `Sent as desired version ${t.desiredVersion}` : null}
                    </td>
                  </tr>
                ))
              )}
            </tbody>
          </table>
        </div>
        {pages > 1 ? (
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
        ) : null}
      </section>
    </div>
  );
}

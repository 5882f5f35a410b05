"use client";
import Link from "next/link";
import { useEffect, useState } from "react";
import useSWR, { useSWRConfig } from "swr";
import type { CompareDto, RestoreResultDto, RevisionDto, RevisionListDto } from "@/db/queries/history";
import { ApiError, sendJson } from "@/lib/fetcher";
import { compareUrl, revisionListUrl } from "@/lib/validation/history";
import { ConfigDiffView } from "./config-diff-view";
import { Badge, HistoryDialog, LocalTime, Notice, buttonClass, dangerButtonClass, errorText, inputClass, primaryButtonClass } from "./ui";

// A zone's history: its revisions (newest first), any two compared field by
// field, and restore of an earlier one as the new desired configuration.

type Flash = { tone: "ok" | "error"; text: string; stale?: boolean } | null;

export function ZoneHistory({ zoneId }: { zoneId: string }) {
  const [page, setPage] = useState(1);
  const listKey = revisionListUrl(zoneId, { page });
  const { data, error, isLoading, mutate } = useSWR<RevisionListDto, ApiError>(listKey, { keepPreviousData: true });
  const { mutate: mutateGlobal } = useSWRConfig();
  const [from, setFrom] = useState<string | null>(null);
  const [to, setTo] = useState<string | null>(null);
  const [restoring, setRestoring] = useState<RevisionDto | null>(null);
  const [deleting, setDeleting] = useState(false);
  const [flash, setFlash] = useState<Flash>(null);

  // Default comparison: the revision before the current one → the current one.
  useEffect(() => {
    if (!data || from || to) return;
    if (data.items.length >= 2) {
      setFrom(data.items[1].id);
      setTo(data.items[0].id);
    } else if (data.items.length === 1) {
      setTo(data.items[0].id);
    }
  }, [data, from, to]);

  const zone = data?.zone;
  const pages = data ? Math.max(1, Math.ceil(data.total / data.pageSize)) : 1;

  async function refreshAll() {
    await mutate();
    // Any comparison may now read differently ("current" moved).
    await mutateGlobal((key) => typeof key === "string" && key.startsWith(`/api/zones/${zoneId}/revisions`));
  }

  return (
    <div className="space-y-6">
      {zone?.deletedAt ? (
        <Notice tone="caution" testId="zone-deleted">
          This zone was deleted on <LocalTime iso={zone.deletedAt} />. Its history stays readable; it can no longer be restored from here. A home
          backup that contains it can bring it back.
        </Notice>
      ) : null}
      {flash ? (
        <Notice tone={flash.tone} testId="history-flash" onDismiss={() => setFlash(null)}>
          {flash.text}
          {flash.stale ? (
            <button type="button" className="ml-2 underline" onClick={() => refreshAll().then(() => setFlash(null))}>
              Reload history
            </button>
          ) : null}
        </Notice>
      ) : null}

      <section aria-labelledby="revisions-heading" className="rounded-lg border border-slate-200 bg-white shadow-sm">
        <div className="flex flex-wrap items-center justify-between gap-3 border-b border-slate-200 p-3">
          <h2 id="revisions-heading" className="font-semibold">
            Revisions {data ? <span className="font-normal text-slate-500">({data.total})</span> : null}
          </h2>
          <p className="text-xs text-slate-500">Pick a “from” and a “to” revision to compare them.</p>
        </div>
        {error ? (
          <div role="alert" data-testid="revisions-error" className="flex items-center justify-between gap-3 bg-danger-50 p-4 text-sm text-danger-700">
            <span>Revisions could not be loaded: {error.message}</span>
            <button onClick={() => mutate()} className="rounded-md bg-white px-3 py-1 ring-1 ring-danger-600/40">
              Retry
            </button>
          </div>
        ) : null}
        <div className="overflow-x-auto">
          <table className="w-full text-left text-sm" data-testid="revisions-table">
            <thead className="bg-slate-50 text-xs uppercase tracking-wide text-slate-500">
              <tr>
                <th scope="col" className="px-3 py-2 text-center">From</th>
                <th scope="col" className="px-3 py-2 text-center">To</th>
                <th scope="col" className="px-3 py-2">Revision</th>
                <th scope="col" className="px-3 py-2">Saved</th>
                <th scope="col" className="px-3 py-2">By</th>
                <th scope="col" className="px-3 py-2">What changed</th>
                <th scope="col" className="px-3 py-2"><span className="sr-only">Actions</span></th>
              </tr>
            </thead>
            <tbody className="divide-y divide-slate-100">
              {isLoading && !data ? (
                <tr>
                  <td colSpan={7} className="px-4 py-8 text-center text-slate-500" role="status">Loading revisions…</td>
                </tr>
              ) : data && data.items.length === 0 ? (
                <tr>
                  <td colSpan={7} className="px-4 py-8 text-center text-slate-500">No revisions yet.</td>
                </tr>
              ) : (
                data?.items.map((r) => (
                  <tr key={r.id} data-testid="revision-row" data-number={r.number} className={r.current ? "bg-accent-50/40" : ""}>
                    <td className="px-3 py-2 text-center">
                      <input
                        type="radio"
                        name="compare-from"
                        aria-label={`Compare from revision ${r.number}`}
                        checked={from === r.id}
                        onChange={() => setFrom(r.id)}
                      />
                    </td>
                    <td className="px-3 py-2 text-center">
                      <input type="radio" name="compare-to" aria-label={`Compare to revision ${r.number}`} checked={to === r.id} onChange={() => setTo(r.id)} />
                    </td>
                    <td className="whitespace-nowrap px-3 py-2 font-medium">
                      #{r.number} {r.current ? <Badge tone="accent">current</Badge> : null}
                    </td>
                    <td className="whitespace-nowrap px-3 py-2 text-slate-600">
                      <LocalTime iso={r.createdAt} />
                    </td>
                    <td className="px-3 py-2">{r.authorName ?? <span className="text-slate-500">Demo data</span>}</td>
                    <td className="px-3 py-2">
                      <div>{r.summary || "—"}</div>
                      {r.message ? <div className="text-xs text-slate-500">“{r.message}”</div> : null}
                      <div className="font-mono text-[11px] text-slate-400" title={r.contentHash}>
                        {r.contentHash.slice(7, 19)}
                      </div>
                    </td>
                    <td className="px-3 py-2 text-right">
                      {zone?.canRestore && !r.current ? (
                        <button type="button" className={buttonClass} onClick={() => setRestoring(r)} aria-label={`Restore revision ${r.number}`}>
                          Restore…
                        </button>
                      ) : null}
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
            <button type="button" className={buttonClass} disabled={page <= 1} onClick={() => setPage((p) => p - 1)}>
              Newer
            </button>
            <button type="button" className={buttonClass} disabled={page >= pages} onClick={() => setPage((p) => p + 1)}>
              Older
            </button>
          </div>
        </div>
      </section>

      <ComparePanel zoneId={zoneId} from={from} to={to} revisions={data?.items ?? []} />

      {zone?.canDelete ? (
        <section aria-labelledby="delete-heading" className="rounded-lg border border-danger-600/20 bg-white p-4">
          <h2 id="delete-heading" className="font-semibold">Delete this zone</h2>
          <p className="mt-1 text-sm text-slate-600">
            The zone leaves the home and releases its device. Its revisions and audit trail stay readable here.
          </p>
          <button type="button" className={`${dangerButtonClass} mt-3`} onClick={() => setDeleting(true)}>
            Delete zone…
          </button>
        </section>
      ) : null}

      {restoring && zone ? (
        <RestoreDialog
          zoneId={zoneId}
          zoneVersion={zone.version}
          revision={restoring}
          onClose={() => setRestoring(null)}
          onDone={async (result) => {
            setRestoring(null);
            setFlash({
              tone: "ok",
              text: result.revision.created
                ? `Revision ${result.restoredFrom} restored as revision ${result.revision.number}. The device plays it after the next push.`
                : `Revision ${result.restoredFrom} restored.`,
            });
            setPage(1);
            setFrom(null);
            setTo(null);
            await refreshAll();
          }}
          onStale={async (message) => {
            setRestoring(null);
            setFlash({ tone: "error", text: message, stale: true });
          }}
        />
      ) : null}
      {deleting && zone ? (
        <DeleteZoneDialog
          zoneId={zoneId}
          zoneName={zone.name}
          zoneVersion={zone.version}
          homeId={zone.homeId}
          onClose={() => setDeleting(false)}
          onDone={async () => {
            setDeleting(false);
            setFlash({ tone: "ok", text: `Zone “${zone.name}” deleted. Its history stays here.` });
            await refreshAll();
          }}
        />
      ) : null}
    </div>
  );
}

function ComparePanel({ zoneId, from, to, revisions }: { zoneId: string; from: string | null; to: string | null; revisions: RevisionDto[] }) {
  const ready = from && to && from !== to;
  const { data, error, isLoading, mutate } = useSWR<CompareDto, ApiError>(ready ? compareUrl(zoneId, from, to) : null);
  const label = (id: string | null, fallback: string) => {
    const r = revisions.find((x) => x.id === id);
    return r ? `revision ${r.number}` : fallback;
  };
  return (
    <section aria-labelledby="compare-heading" className="rounded-lg border border-slate-200 bg-white p-4 shadow-sm" data-testid="compare-panel">
      <h2 id="compare-heading" className="font-semibold">
        {data ? `Revision ${data.from.number} → revision ${data.to.number}` : `Compare ${label(from, "…")} → ${label(to, "…")}`}
      </h2>
      <div className="mt-3">
        {!ready ? (
          <p className="text-sm text-slate-600">{from && from === to ? "Pick two different revisions." : "Pick a “from” and a “to” revision in the table."}</p>
        ) : error ? (
          <div role="alert" className="flex items-center justify-between gap-3 rounded-md bg-danger-50 p-3 text-sm text-danger-700">
            <span>The comparison could not be loaded: {error.message}</span>
            <button onClick={() => mutate()} className="rounded-md bg-white px-3 py-1 ring-1 ring-danger-600/40">Retry</button>
          </div>
        ) : isLoading || !data ? (
          <p role="status" className="text-sm text-slate-500">Comparing…</p>
        ) : (
          <ConfigDiffView diff={data.diff} beforeLabel={`Revision ${data.from.number}`} afterLabel={`Revision ${data.to.number}`} />
        )}
      </div>
    </section>
  );
}

function RestoreDialog({
  zoneId,
  zoneVersion,
  revision,
  onClose,
  onDone,
  onStale,
}: {
  zoneId: string;
  zoneVersion: number;
  revision: RevisionDto;
  onClose: () => void;
  onDone: (result: RestoreResultDto) => Promise<void>;
  onStale: (message: string) => Promise<void>;
}) {
  const { data, error } = useSWR<CompareDto, ApiError>(compareUrl(zoneId, "current", revision.id));
  const [message, setMessage] = useState("");
  const [busy, setBusy] = useState(false);
  const [failure, setFailure] = useState<string | null>(null);
  const ceiling = data?.diff.changes.find((c) => c.path === "volumeCeiling");
  const raisesCeiling = ceiling && typeof ceiling.before === "number" && typeof ceiling.after === "number" && ceiling.after > ceiling.before;

  async function submit(event: React.FormEvent) {
    event.preventDefault();
    setBusy(true);
    setFailure(null);
    try {
      const result = await sendJson<RestoreResultDto>(`/api/zones/${zoneId}/revisions/${revision.id}/restore`, "POST", {
        expectedVersion: zoneVersion,
        ...(message.trim() ? { message: message.trim() } : {}),
      });
      await onDone(result);
    } catch (e) {
      if (e instanceof ApiError && e.code === "zone:stale") await onStale(e.message);
      else setFailure(errorText(e));
    } finally {
      setBusy(false);
    }
  }

  return (
    <HistoryDialog
      open
      onOpenChange={(open) => (!open ? onClose() : undefined)}
      title={`Restore revision ${revision.number}?`}
      description="Its configuration becomes the zone’s desired configuration again, as a new revision. Nothing is deleted from the history."
      testId="restore-dialog"
    >
      <form onSubmit={submit}>
        {failure ? (
          <div className="mb-3">
            <Notice tone="error" testId="restore-error">{failure}</Notice>
          </div>
        ) : null}
        <h3 className="text-sm font-semibold">What changes (current → revision {revision.number})</h3>
        <div className="mt-2 max-h-72 overflow-y-auto">
          {error ? (
            <p role="alert" className="text-sm text-danger-700">The changes could not be loaded: {error.message}</p>
          ) : !data ? (
            <p role="status" className="text-sm text-slate-500">Working out the changes…</p>
          ) : (
            <ConfigDiffView diff={data.diff} beforeLabel="Current" afterLabel={`Revision ${revision.number}`} testId="restore-diff" />
          )}
        </div>
        {raisesCeiling ? (
          <p className="mt-3 rounded border border-caution-500/40 bg-caution-50 px-2 py-1 text-xs text-caution-700" role="note">
            ⚠ This raises the volume ceiling from {String(ceiling!.before)} % to {String(ceiling!.after)} %. Sustained levels above about 85 dBA can
            damage hearing, and high levels can damage speakers; check the level in the room after the push.
          </p>
        ) : null}
        <label className="mt-4 block text-sm font-medium text-slate-700" htmlFor="restore-note">
          Note for the history <span className="font-normal text-slate-500">(optional)</span>
        </label>
        <input id="restore-note" className={inputClass} value={message} maxLength={500} onChange={(e) => setMessage(e.target.value)} placeholder="Why this revision?" />
        <div className="mt-5 flex justify-end gap-2">
          <button type="button" className={buttonClass} onClick={onClose}>
            Cancel
          </button>
          <button type="submit" className={primaryButtonClass} disabled={busy || data?.diff.identical}>
            {busy ? "Restoring…" : `Restore revision ${revision.number}`}
          </button>
        </div>
      </form>
    </HistoryDialog>
  );
}

function DeleteZoneDialog({
  zoneId,
  zoneName,
  zoneVersion,
  homeId,
  onClose,
  onDone,
}: {
  zoneId: string;
  zoneName: string;
  zoneVersion: number;
  homeId: string;
  onClose: () => void;
  onDone: () => Promise<void>;
}) {
  const [busy, setBusy] = useState(false);
  const [failure, setFailure] = useState<string | null>(null);
  async function submit(event: React.FormEvent) {
    event.preventDefault();
    setBusy(true);
    setFailure(null);
    try {
      await sendJson(`/api/zones/${zoneId}?expectedVersion=${zoneVersion}`, "DELETE");
      await onDone();
    } catch (e) {
      setFailure(errorText(e));
    } finally {
      setBusy(false);
    }
  }
  return (
    <HistoryDialog open onOpenChange={(open) => (!open ? onClose() : undefined)} title={`Delete “${zoneName}”?`} testId="delete-zone-dialog">
      <form onSubmit={submit}>
        {failure ? (
          <div className="mb-3">
            <Notice tone="error">{failure}</Notice>
          </div>
        ) : null}
        <p className="text-sm text-slate-700">
          The zone disappears from the home and its device is released for another zone. Its revisions and audit trail stay readable to integrators
          and the owner under the{" "}
          <Link className="text-accent-700 underline" href={`/homes/${homeId}/activity`}>
            home’s history
          </Link>
          . The device keeps playing its last configuration until it is given another one.
        </p>
        <div className="mt-5 flex justify-end gap-2">
          <button type="button" className={buttonClass} onClick={onClose}>
            Cancel
          </button>
          <button type="submit" className={dangerButtonClass} disabled={busy}>
            {busy ? "Deleting…" : "Delete zone"}
          </button>
        </div>
      </form>
    </HistoryDialog>
  );
}

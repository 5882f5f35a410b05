"use client";
import Link from "next/link";
import { useEffect, useMemo, useState } from "react";
import useSWR from "swr";
import type { BulkZoneResult, TemplateUpdatePreview, TemplateUpdatePreviewZone } from "@/db/queries/templates";
import { sendJson, type ApiError } from "@/lib/fetcher";
import { Badge, buttonClass, errorText, Notice, primaryButtonClass } from "./ui";

const reasonLabel = { override: "set in this zone", locked: "locked by support", "local-only": "only in this zone" } as const;

const UPDATE_BATCH = 50;

function selectable(z: TemplateUpdatePreviewZone) {
  return z.canApply && z.problems.length === 0 && (z.changes.length > 0 || z.behind);
}

/**
 * Bring zones made from this template up to its current version: per zone, the
 * field-by-field change, what is kept (and why), then one revision per zone,
 * ready to push.
 */
export function TemplateUpdatePanel({
  templateId,
  templateVersion,
  canPush,
  onUpdated,
}: {
  templateId: string;
  templateVersion: number;
  canPush: boolean;
  onUpdated: () => void;
}) {
  // The version in the key: a newer template version means a new preview.
  const key = `/api/templates/${templateId}/update-preview?v=${templateVersion}`;
  const { data, error, isLoading, mutate } = useSWR<TemplateUpdatePreview, ApiError>(key);
  const [chosen, setChosen] = useState<Set<string>>(new Set());
  const [busy, setBusy] = useState(false);
  const [results, setResults] = useState<BulkZoneResult[] | null>(null);
  const [failure, setFailure] = useState<string | null>(null);
  const [pushState, setPushState] = useState<{ tone: "ok" | "error"; text: string } | null>(null);
  const [pushing, setPushing] = useState(false);
  const [progress, setProgress] = useState<{ done: number; total: number } | null>(null);

  useEffect(() => {
    if (data) setChosen(new Set(data.zones.filter((z) => z.behind && selectable(z)).map((z) => z.zoneId)));
  }, [data]);

  const names = useMemo(() => new Map(data?.zones.map((z) => [z.zoneId, `${z.zoneName} (${z.home.name})`]) ?? []), [data]);

  async function update() {
    if (!data) return;
    setBusy(true);
    setFailure(null);
    setResults(null);
    setPushState(null);
    const zones = data.zones.filter((z) => chosen.has(z.zoneId)).map((z) => ({ zoneId: z.zoneId, version: z.version }));
    const done: BulkZoneResult[] = [];
    setProgress({ done: 0, total: zones.length });
    try {
      // In batches, so a large update shows its progress and no single request runs long.
      for (let i = 0; i < zones.length; i += UPDATE_BATCH) {
        const res = await sendJson<{ results: BulkZoneResult[] }>(`/api/templates/${templateId}/update`, "POST", {
          templateVersion: data.template.version,
          zones: zones.slice(i, i + UPDATE_BATCH),
        });
        done.push(...res.results);
        setProgress({ done: done.length, total: zones.length });
      }
    } catch (e) {
      setFailure(`${errorText(e)}${done.length ? ` (${done.length} of ${zones.length} zones were handled before this)` : ""}`);
    } finally {
      setResults(done);
      setProgress(null);
      setBusy(false);
      onUpdated();
      await mutate();
    }
  }

  if (error) {
    return (
      <Notice tone="error">
        The preview could not be made: {error.message}{" "}
        <button type="button" className="underline" onClick={() => mutate()}>Retry</button>
      </Notice>
    );
  }
  if (isLoading || !data) return <p role="status" className="text-sm text-slate-500">Working out what an update would change…</p>;
  if (data.zones.length === 0) return <p className="text-sm text-slate-600">No zone is made from this template, so there is nothing to update.</p>;

  const ok = (results?.filter((r) => r.ok) ?? []) as Extract<BulkZoneResult, { ok: true }>[];

  /** The updated zones' new revisions, as one push (refused if a zone changed again since). */
  async function pushUpdated() {
    setPushing(true);
    setPushState(null);
    try {
      const started = await sendJson<{ pushId: string; targetCount: number }>("/api/pushes", "POST", {
        scope: { kind: "selection", zoneIds: ok.map((r) => r.zoneId) },
        expectedRevisions: Object.fromEntries(ok.map((r) => [r.zoneId, r.revision.id])),
        note: `template update to version ${data?.template.version}`,
      });
      setPushState({ tone: "ok", text: `Push started to ${started.targetCount} device${started.targetCount === 1 ? "" : "s"}.` });
    } catch (e) {
      setPushState({ tone: "error", text: `No push started: ${errorText(e)}` });
    } finally {
      setPushing(false);
    }
  }
  const failed = results?.filter((r): r is Extract<BulkZoneResult, { ok: false }> => !r.ok) ?? [];

  return (
    <div className="space-y-3" data-testid="update-panel">
      {results ? (
        <div className="space-y-2" aria-live="polite">
          {ok.length ? (
            <Notice tone="ok" testId="update-results">
              Updated {ok.length} zone{ok.length === 1 ? "" : "s"} to version {data.template.version}:{" "}
              {ok.map((r) => `${names.get(r.zoneId)} → revision ${r.revision.number}`).join("; ")}. The revisions are saved and ready to push.
              {canPush ? (
                <button type="button" className={`${primaryButtonClass} ml-2`} onClick={pushUpdated} disabled={pushing}>
                  {pushing ? "Starting the push…" : `Push ${ok.length === 1 ? "it" : `these ${ok.length}`} now`}
                </button>
              ) : null}
            </Notice>
          ) : null}
          {pushState ? (
            <Notice tone={pushState.tone} testId="push-started">
              {pushState.text} {pushState.tone === "ok" ? <Link href="/pushes" className="underline">Follow it on Pushes</Link> : null}
            </Notice>
          ) : null}
          {failed.length ? (
            <Notice tone="error" testId="update-failures">
              Not updated: {failed.map((r) => `${names.get(r.zoneId) ?? r.zoneId} — ${r.message}`).join("; ")}
            </Notice>
          ) : null}
        </div>
      ) : null}
      {failure ? <Notice tone="error">{failure}</Notice> : null}
      {progress ? (
        <div role="status" className="space-y-1 text-sm text-slate-600">
          <p>Updating zones: {progress.done} of {progress.total}…</p>
          <progress className="h-2 w-full" max={progress.total} value={progress.done} aria-label="Zones updated" />
        </div>
      ) : null}

      <ul className="space-y-3">
        {data.zones.map((z) => {
          const can = selectable(z);
          return (
            <li key={z.zoneId} className="rounded-lg border border-slate-200 bg-white p-3" data-testid="preview-zone">
              <div className="flex flex-wrap items-center justify-between gap-2">
                <label className="inline-flex items-center gap-2 font-medium">
                  <input type="checkbox" disabled={!can || busy} checked={chosen.has(z.zoneId)}
                    onChange={(e) => setChosen((c) => { const n = new Set(c); if (e.target.checked) n.add(z.zoneId); else n.delete(z.zoneId); return n; })} />
                  {z.zoneName} <span className="font-normal text-slate-500">in</span> <Link href={`/homes/${z.home.id}`} className="text-accent-700 hover:underline">{z.home.name}</Link>
                </label>
                <span className="flex flex-wrap gap-1">
                  <Badge tone={z.behind ? "caution" : "accent"}>v{z.templateVersion ?? "?"}{z.behind ? ` → v${data.template.version}` : " (current)"}</Badge>
                  <Badge>{z.changes.length} change{z.changes.length === 1 ? "" : "s"}</Badge>
                  {z.kept.length ? <Badge>{z.kept.length} kept</Badge> : null}
                  {!z.canApply ? <Badge tone="danger">not in your homes</Badge> : null}
                </span>
              </div>
              {z.problems.length ? <p className="mt-1 text-sm text-danger-700">The zone’s device cannot take the result: {z.problems.join(" ")}</p> : null}
              {z.changes.length ? (
                <table className="mt-2 w-full text-left text-sm">
                  <caption className="sr-only">Changes to {z.zoneName}</caption>
                  <thead className="text-xs uppercase tracking-wide text-slate-500">
                    <tr><th scope="col">Field</th><th scope="col">Now</th><th scope="col">After the update</th></tr>
                  </thead>
                  <tbody>
                    {z.changes.map((c, i) => (
                      <tr key={`${c.path}-${i}`} className="align-top">
                        <td className="pr-2">{c.op === "changed" ? `${c.subject}: ${c.field}` : c.text}</td>
                        <td className="pr-2 text-slate-600">{c.op === "changed" || c.op === "reordered" ? c.beforeText : c.op === "removed" ? c.beforeText : "—"}</td>
                        <td>{c.op === "removed" ? "removed" : c.afterText}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              ) : (
                <p className="mt-1 text-sm text-slate-600">Already matches the template{z.behind ? "; the update only records the new version" : ""}.</p>
              )}
              {z.kept.length ? (
                <div className="mt-2">
                  <h4 className="text-xs font-semibold uppercase tracking-wide text-slate-500">Kept as the zone has it</h4>
                  <ul className="mt-1 space-y-0.5 text-sm" data-testid="kept-fields">
                    {z.kept.map((k) => (
                      <li key={k.path}>
                        <Badge tone={k.reason === "locked" ? "caution" : "neutral"}>{reasonLabel[k.reason]}</Badge> {k.text}
                      </li>
                    ))}
                  </ul>
                </div>
              ) : null}
            </li>
          );
        })}
      </ul>
      <div className="flex flex-wrap items-center justify-end gap-2">
        <button type="button" className={buttonClass} onClick={() => mutate()} disabled={busy}>Refresh preview</button>
        <button type="button" className={primaryButtonClass} onClick={update} disabled={busy || chosen.size === 0}>
          {busy ? `Updating ${chosen.size} zone${chosen.size === 1 ? "" : "s"}…` : `Update ${chosen.size} zone${chosen.size === 1 ? "" : "s"} to version ${data.template.version}`}
        </button>
      </div>
    </div>
  );
}

"use client";
import Link from "next/link";
import { useRef, useState } from "react";
import type { RestorePreviewDto, RestoreResultDto, ZoneRestoreAction } from "@/db/queries/backup";
import { ApiError } from "@/lib/fetcher";
import { isErrorBody } from "@/lib/errors";
import { ConfigDiffView } from "./config-diff-view";
import { Badge, HistoryDialog, LocalTime, Notice, buttonClass, primaryButtonClass } from "./ui";

// Download a home backup; upload one (with progress), see per zone what it
// would change, then apply it in one step — all zones or none.

const actionBadges: Record<ZoneRestoreAction, { label: string; tone: "neutral" | "accent" | "caution" | "danger" }> = {
  update: { label: "will change", tone: "caution" },
  unchanged: { label: "no change", tone: "neutral" },
  revive: { label: "brought back", tone: "accent" },
  create: { label: "created", tone: "accent" },
};

function megabytes(n: number) {
  return `${(n / (1024 * 1024)).toFixed(1)} MB`;
}

/** POST a form with upload progress (fetch cannot report upload progress). */
function upload<T>(url: string, form: FormData, onProgress: (fraction: number) => void): Promise<T> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open("POST", url);
    xhr.setRequestHeader("accept", "application/json");
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) onProgress(e.loaded / e.total);
    };
    xhr.onerror = () => reject(new ApiError(0, "network", "The upload did not reach the server. Check the connection and try again."));
    xhr.onload = () => {
      let body: unknown = null;
      try {
        body = JSON.parse(xhr.responseText);
      } catch {
        /* not JSON */
      }
      if (xhr.status >= 200 && xhr.status < 300) resolve(body as T);
      else if (isErrorBody(body)) reject(new ApiError(xhr.status, body.error.code, body.error.message, body.error.fieldErrors, body.error.details));
      else reject(new ApiError(xhr.status, "server:unexpected", `The server answered ${xhr.status}.`));
    };
    xhr.send(form);
  });
}

type Phase = { kind: "idle" } | { kind: "uploading"; what: "preview" | "restore"; progress: number };

export function BackupPanel({
  homeId,
  homeName,
  canExport,
  canRestore,
  maxBytes,
}: {
  homeId: string;
  homeName: string;
  canExport: boolean;
  canRestore: boolean;
  maxBytes: number;
}) {
  const [file, setFile] = useState<File | null>(null);
  const [phase, setPhase] = useState<Phase>({ kind: "idle" });
  const [preview, setPreview] = useState<RestorePreviewDto | null>(null);
  const [error, setError] = useState<ApiError | null>(null);
  const [result, setResult] = useState<RestoreResultDto | null>(null);
  const [confirming, setConfirming] = useState(false);
  const input = useRef<HTMLInputElement>(null);

  function choose(f: File | null) {
    setFile(f);
    setPreview(null);
    setResult(null);
    setError(null);
    if (f && f.size > maxBytes) {
      setError(new ApiError(413, "request:too-large", `The file is ${megabytes(f.size)}; the limit is ${megabytes(maxBytes)}. Choose a home backup file.`));
    }
  }

  async function runPreview() {
    if (!file) return;
    setError(null);
    setResult(null);
    setPhase({ kind: "uploading", what: "preview", progress: 0 });
    const form = new FormData();
    form.set("file", file);
    try {
      setPreview(await upload<RestorePreviewDto>(`/api/homes/${homeId}/backup/preview`, form, (p) => setPhase({ kind: "uploading", what: "preview", progress: p })));
    } catch (e) {
      setPreview(null);
      setError(e instanceof ApiError ? e : new ApiError(0, "server:unexpected", String(e)));
    } finally {
      setPhase({ kind: "idle" });
    }
  }

  async function apply() {
    if (!file || !preview) return;
    setConfirming(false);
    setError(null);
    setPhase({ kind: "uploading", what: "restore", progress: 0 });
    const form = new FormData();
    form.set("file", file);
    form.set("previewToken", preview.previewToken);
    try {
      const done = await upload<RestoreResultDto>(`/api/homes/${homeId}/backup/restore`, form, (p) => setPhase({ kind: "uploading", what: "restore", progress: p }));
      setResult(done);
      setPreview(null);
      setFile(null);
      if (input.current) input.current.value = "";
    } catch (e) {
      setError(e instanceof ApiError ? e : new ApiError(0, "server:unexpected", String(e)));
    } finally {
      setPhase({ kind: "idle" });
    }
  }

  const busy = phase.kind === "uploading";
  const changing = preview ? preview.zones.filter((z) => z.action !== "unchanged").length + (preview.home.changes.length ? 1 : 0) : 0;

  return (
    <div className="space-y-6">
      <section aria-labelledby="download-heading" className="rounded-lg border border-slate-200 bg-white p-4 shadow-sm">
        <h2 id="download-heading" className="font-semibold">Download a backup</h2>
        <p className="mt-1 text-sm text-slate-600">
          One JSON file with the whole desired configuration of {homeName}: every zone, the tone curves and zone templates they use, a schema
          version, the time it was made and a content hash that shows whether it was changed since.
        </p>
        {canExport ? (
          <a href={`/api/homes/${homeId}/backup`} download className={`${primaryButtonClass} mt-3`} data-testid="backup-download">
            Download backup (JSON)
          </a>
        ) : (
          <p className="mt-3 text-sm text-slate-500">Your role may not download backups.</p>
        )}
      </section>

      {canRestore ? (
        <section aria-labelledby="restore-heading" className="rounded-lg border border-slate-200 bg-white p-4 shadow-sm">
          <h2 id="restore-heading" className="font-semibold">Restore from a backup</h2>
          <p className="mt-1 text-sm text-slate-600">
            Choose a backup of this home (at most {megabytes(maxBytes)}). You will see per zone what would change before anything is written; applying
            restores every zone in one step, or none at all.
          </p>
          <div className="mt-3 flex flex-wrap items-center gap-3">
            <label htmlFor="backup-file" className="sr-only">Backup file</label>
            <input
              ref={input}
              id="backup-file"
              type="file"
              accept=".json,application/json"
              onChange={(e) => choose(e.target.files?.[0] ?? null)}
              className="text-sm file:mr-3 file:rounded-md file:border-0 file:bg-slate-100 file:px-3 file:py-1.5 file:text-sm file:font-medium"
              data-testid="backup-file"
            />
            <button type="button" className={buttonClass} disabled={!file || busy || (file?.size ?? 0) > maxBytes} onClick={runPreview}>
              Preview restore
            </button>
          </div>
          {busy ? (
            <div className="mt-3" role="status" aria-live="polite">
              <p className="text-sm text-slate-600">
                {phase.what === "preview" ? "Uploading and checking the file" : "Restoring"}… {Math.round(phase.progress * 100)} %
                {phase.progress >= 1 ? (phase.what === "preview" ? " — working out the changes" : " — writing every zone") : ""}
              </p>
              <progress className="mt-1 h-2 w-full" max={1} value={phase.progress} aria-label="Upload progress" />
            </div>
          ) : null}
          {error ? (
            <div className="mt-3">
              <Notice tone="error" testId="backup-error">
                <p>{error.message}</p>
                {error.fieldErrors ? (
                  <ul className="mt-1 list-disc pl-5 text-xs">
                    {Object.entries(error.fieldErrors)
                      .slice(0, 12)
                      .map(([path, messages]) => (
                        <li key={path}>
                          <span className="font-mono">{path}</span>: {messages.join(" ")}
                        </li>
                      ))}
                  </ul>
                ) : null}
                {error.code === "backup:stale-preview" ? (
                  <button type="button" className="mt-2 underline" onClick={runPreview}>
                    Preview again
                  </button>
                ) : null}
              </Notice>
            </div>
          ) : null}
          {result ? (
            <div className="mt-3">
              <Notice tone="ok" testId="backup-result">
                <p>Restored {homeName}. Every zone below now has this configuration; the devices play it after the next push.</p>
                <ul className="mt-1 list-disc pl-5 text-xs">
                  {result.zones.map((z) => (
                    <li key={z.zoneId}>
                      <Link href={`/zones/${z.zoneId}/history`} className="underline">{z.name}</Link>: {actionBadges[z.action].label}
                      {z.revision ? (z.revision.created ? ` (revision ${z.revision.number})` : " (same as its last revision)") : ""}
                    </li>
                  ))}
                </ul>
              </Notice>
            </div>
          ) : null}
        </section>
      ) : null}

      {preview ? (
        <section aria-labelledby="preview-heading" className="rounded-lg border border-slate-200 bg-white p-4 shadow-sm" data-testid="backup-preview">
          <div className="flex flex-wrap items-start justify-between gap-3">
            <div>
              <h2 id="preview-heading" className="font-semibold">What this backup would change</h2>
              <p className="mt-1 text-sm text-slate-600">
                Made <LocalTime iso={preview.backup.createdAt} />
                {preview.backup.createdBy ? ` by ${preview.backup.createdBy}` : ""} · {preview.backup.zoneCount} zone
                {preview.backup.zoneCount === 1 ? "" : "s"} · schema version {preview.backup.schemaVersion}
                {preview.backup.migratedFrom !== null ? " (migrated to the current version for this preview)" : ""} ·{" "}
                <span className="font-mono text-xs" title={preview.backup.contentHash}>{preview.backup.contentHash.slice(7, 19)}</span>
              </p>
            </div>
            <button type="button" className={primaryButtonClass} disabled={!preview.canApply || busy || changing === 0} onClick={() => setConfirming(true)}>
              Apply restore…
            </button>
          </div>
          {!preview.canApply ? (
            <div className="mt-3">
              <Notice tone="error">Some zones cannot take this configuration (see below). Nothing can be applied until the file is fixed.</Notice>
            </div>
          ) : changing === 0 ? (
            <p className="mt-3 text-sm text-slate-600">The home already matches this backup; there is nothing to apply.</p>
          ) : null}

          {preview.home.changes.length ? (
            <div className="mt-4">
              <h3 className="text-sm font-semibold">Home details</h3>
              <ul className="mt-1 text-sm">
                {preview.home.changes.map((c) => (
                  <li key={c.field}>
                    <span className="text-slate-600">{c.field}</span>: {String(c.before ?? "none")} → <span className="font-medium">{String(c.after ?? "none")}</span>
                  </li>
                ))}
              </ul>
            </div>
          ) : null}

          <div className="mt-4 overflow-x-auto">
            <table className="w-full text-left text-sm" data-testid="backup-preview-table">
              <thead className="bg-slate-50 text-xs uppercase tracking-wide text-slate-500">
                <tr>
                  <th scope="col" className="px-3 py-2">Zone</th>
                  <th scope="col" className="px-3 py-2">Outcome</th>
                  <th scope="col" className="px-3 py-2">What would change</th>
                </tr>
              </thead>
              <tbody className="divide-y divide-slate-100">
                {preview.zones.map((z) => (
                  <tr key={z.fileZoneId} className="align-top" data-testid="backup-preview-row">
                    <td className="px-3 py-2 font-medium">{z.name}</td>
                    <td className="px-3 py-2">
                      <Badge tone={z.problems.length ? "danger" : actionBadges[z.action].tone}>{z.problems.length ? "cannot apply" : actionBadges[z.action].label}</Badge>
                    </td>
                    <td className="px-3 py-2">
                      <div>{z.summary}</div>
                      {z.problems.map((p) => (
                        <p key={p} className="text-xs text-danger-700">{p}</p>
                      ))}
                      {z.notes.map((n) => (
                        <p key={n} className="text-xs text-slate-500">{n}</p>
                      ))}
                      {z.diff && !z.diff.identical ? (
                        <details className="mt-1">
                          <summary className="cursor-pointer text-xs text-accent-700">Show the changes field by field</summary>
                          <div className="mt-2">
                            <ConfigDiffView diff={z.diff} beforeLabel="Now" afterLabel="From the backup" testId={`backup-diff-${z.index}`} />
                          </div>
                        </details>
                      ) : null}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>

          {preview.untouched.length ? (
            <p className="mt-3 text-sm text-slate-600">
              Not in the backup, left as they are: {preview.untouched.map((z) => z.name).join(", ")}.
            </p>
          ) : null}
          {preview.curves.some((c) => c.outcome !== "reattached") || preview.templates.some((t) => t.outcome !== "reattached") ? (
            <div className="mt-3 text-sm">
              <h3 className="font-semibold">Library</h3>
              <ul className="mt-1 list-disc pl-5 text-slate-700">
                {preview.curves
                  .filter((c) => c.outcome !== "reattached")
                  .map((c) => (
                    <li key={`c-${c.requestedName}-${c.name}`}>
                      Tone curve “{c.requestedName}”: {c.outcome === "matched" ? `uses the library curve “${c.name}” (same bands)` : `will be added to the library as “${c.name}”`}
                    </li>
                  ))}
                {preview.templates
                  .filter((t) => t.outcome !== "reattached")
                  .map((t) => (
                    <li key={`t-${t.requestedName}-${t.name}`}>
                      Zone template “{t.requestedName ?? "unknown"}”:{" "}
                      {t.outcome === "matched" ? `uses the library template “${t.name}” (same configuration)` : t.outcome === "created" ? `will be added to the library as “${t.name}”` : "not available; zones are restored without it"}
                    </li>
                  ))}
              </ul>
            </div>
          ) : null}
        </section>
      ) : null}

      {confirming && preview ? (
        <HistoryDialog open onOpenChange={(open) => setConfirming(open)} title={`Restore ${homeName} from this backup?`} testId="backup-confirm">
          <p className="text-sm text-slate-700">
            {changing} part{changing === 1 ? "" : "s"} of the home will change. Every zone is written in one step: if anything fails, nothing changes. Each
            restored zone gets a new revision, and the whole restore is in the activity trail.
          </p>
          <p className="mt-2 text-xs text-caution-700" role="note">
            ⚠ Restored volume ceilings and tone curves take effect on the devices at the next push; check the levels in the rooms afterwards.
          </p>
          <div className="mt-5 flex justify-end gap-2">
            <button type="button" className={buttonClass} onClick={() => setConfirming(false)}>
              Cancel
            </button>
            <button type="button" className={primaryButtonClass} onClick={apply}>
              Apply restore
            </button>
          </div>
        </HistoryDialog>
      ) : null}
    </div>
  );
}

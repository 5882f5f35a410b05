"use client";
import * as Dialog from "@radix-ui/react-dialog";
import { useRouter } from "next/navigation";
import { useEffect, useState } from "react";
import type { PreviewZoneDto, PushPreviewDto, StartPushResultDto } from "@/lib/fleet/push-service";
import { sendJson } from "@/lib/fetcher";
import type { PushScope } from "@/lib/validation/pushes";

// Before confirming a push: per zone what will change (last reported → pushed,
// field by field), what is refused and why, what is skipped or already in sync.

const outcomeText: Record<PreviewZoneDto["outcome"], string> = {
  push: "Will be pushed",
  refused: "Refused",
  skipped: "Skipped",
  unchanged: "Already in sync",
};

const outcomeTone: Record<PreviewZoneDto["outcome"], string> = {
  push: "text-accent-700",
  refused: "text-danger-700",
  skipped: "text-slate-600",
  unchanged: "text-slate-600",
};

export function PushPreviewDialogContent({ scope, open, onDone }: { scope: PushScope; open: boolean; onDone?: (result: StartPushResultDto) => void }) {
  const router = useRouter();
  const [preview, setPreview] = useState<PushPreviewDto | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [starting, setStarting] = useState(false);
  const [note, setNote] = useState("");
  const scopeKey = JSON.stringify(scope);

  useEffect(() => {
    if (!open) return;
    let cancelled = false;
    setPreview(null);
    setError(null);
    sendJson<PushPreviewDto>("/api/pushes/preview", "POST", { scope: JSON.parse(scopeKey) })
      .then((p) => !cancelled && setPreview(p))
      .catch((e: Error) => !cancelled && setError(e.message));
    return () => {
      cancelled = true;
    };
  }, [open, scopeKey]);

  async function start() {
    if (!preview) return;
    setStarting(true);
    setError(null);
    try {
      const expectedRevisions = Object.fromEntries(preview.zones.filter((z) => z.outcome === "push" && z.revision).map((z) => [z.zoneId, z.revision!.id]));
      const result = await sendJson<StartPushResultDto>("/api/pushes", "POST", { scope, expectedRevisions, ...(note.trim() ? { note: note.trim() } : {}) });
      onDone?.(result);
      router.push(`/pushes/${result.pushId}`);
    } catch (e) {
      setError(e instanceof Error ? e.message : String(e));
      setStarting(false);
    }
  }

  const toPush = preview?.counts.push ?? 0;
  return (
    <Dialog.Portal>
      <Dialog.Overlay className="fixed inset-0 z-40 bg-slate-900/40" />
      <Dialog.Content
        className="fixed left-1/2 top-1/2 z-50 flex max-h-[90vh] w-[min(56rem,calc(100vw-2rem))] -translate-x-1/2 -translate-y-1/2 flex-col rounded-lg bg-white shadow-xl"
        data-testid="push-preview"
      >
        <div className="border-b border-slate-200 p-5">
          <Dialog.Title className="text-lg font-semibold">Push {preview ? `“${preview.scope.label}”` : "…"}</Dialog.Title>
          <Dialog.Description className="mt-1 text-sm text-slate-600">
            {preview
              ? `${toPush} zone${toPush === 1 ? "" : "s"} will be pushed${preview.counts.refused ? `, ${preview.counts.refused} refused` : ""}${
                  preview.counts.skipped ? `, ${preview.counts.skipped} skipped` : ""
                }${preview.counts.unchanged ? `, ${preview.counts.unchanged} already in sync` : ""}.`
              : error
                ? "The preview could not be made."
                : "Working out what will change…"}
          </Dialog.Description>
        </div>
        <div className="flex-1 overflow-y-auto p-5">
          {!preview && !error ? <p role="status" className="text-sm text-slate-500">Loading the preview…</p> : null}
          {preview ? (
            <ul className="space-y-3" aria-label="Zones in this push">
              {preview.zones.map((z) => (
                <li key={z.zoneId} className="rounded-md border border-slate-200 p-3" data-testid="preview-zone" data-outcome={z.outcome}>
                  <div className="flex flex-wrap items-baseline justify-between gap-2">
                    <p className="font-medium">
                      {z.zoneName} <span className="font-normal text-slate-500">· {z.homeName}</span>
                    </p>
                    <p className={`text-sm font-medium ${outcomeTone[z.outcome]}`}>{outcomeText[z.outcome]}</p>
                  </div>
                  <p className="text-xs text-slate-500">
                    {z.device ? `${z.device.modelName} · ${z.device.serial}${z.device.online ? "" : " · offline"}` : "No device"}
                    {z.revision ? ` · revision ${z.revision.number}` : ""}
                  </p>
                  {z.reasons.length ? (
                    <ul className="mt-1 list-disc pl-5 text-sm text-danger-700">
                      {z.reasons.map((r) => (
                        <li key={r}>{r}</li>
                      ))}
                    </ul>
                  ) : null}
                  {z.warnings.map((w) => (
                    <p key={w} className="mt-1 text-sm text-caution-700">
                      {w}
                    </p>
                  ))}
                  {z.outcome === "push" ? (
                    z.firstPush ? (
                      <p className="mt-1 text-sm text-slate-600">First push: the device has not reported a configuration yet, so everything is sent.</p>
                    ) : z.changes.length ? (
                      <details className="mt-1 text-sm">
                        <summary className="cursor-pointer text-slate-700">{z.summary}</summary>
                        <table className="mt-2 w-full text-left text-xs">
                          <thead className="text-slate-500">
                            <tr>
                              <th scope="col" className="py-1 pr-2">What</th>
                              <th scope="col" className="py-1 pr-2">Device reports now</th>
                              <th scope="col" className="py-1">After the push</th>
                            </tr>
                          </thead>
                          <tbody className="divide-y divide-slate-100">
                            {z.changes.map((c, i) => (
                              <tr key={i}>
                                <td className="py-1 pr-2">
                                  {c.subject} · {c.field}
                                </td>
                                <td className="py-1 pr-2 tabular-nums">{c.reported}</td>
                                <td className="py-1 tabular-nums">{c.pushed}</td>
                              </tr>
                            ))}
                          </tbody>
                        </table>
                      </details>
                    ) : (
                      <p className="mt-1 text-sm text-slate-600">{z.summary}</p>
                    )
                  ) : null}
                </li>
              ))}
            </ul>
          ) : null}
        </div>
        <div className="border-t border-slate-200 p-5">
          {error ? (
            <p role="alert" className="mb-3 text-sm text-danger-700">
              {error}
            </p>
          ) : null}
          <label className="block text-sm">
            <span className="text-slate-600">Note for the history (optional)</span>
            <input
              value={note}
              onChange={(e) => setNote(e.target.value)}
              maxLength={500}
              className="mt-1 w-full rounded-md border border-slate-300 px-3 py-1.5 text-sm"
              placeholder="e.g. new station order after the client's call"
            />
          </label>
          <div className="mt-3 flex justify-end gap-2">
            <Dialog.Close className="rounded-md px-3 py-1.5 text-sm ring-1 ring-slate-300 hover:bg-slate-50">Cancel</Dialog.Close>
            <button
              type="button"
              onClick={start}
              disabled={!preview || toPush === 0 || starting}
              className="rounded-md bg-accent-600 px-3 py-1.5 text-sm font-medium text-white hover:bg-accent-700 disabled:opacity-50"
              data-testid="confirm-push"
            >
              {starting ? "Starting…" : `Push ${toPush} zone${toPush === 1 ? "" : "s"}`}
            </button>
          </div>
        </div>
      </Dialog.Content>
    </Dialog.Portal>
  );
}

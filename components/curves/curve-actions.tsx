"use client";
import { useState } from "react";
import { useSWRConfig } from "swr";
import type { CurveDetailDto, CurveSummaryDto } from "@/db/queries/curves";
import { ApiError, sendJson } from "@/lib/fetcher";
import { curvesUrl, curveUrl } from "@/lib/validation/curves";
import { AudioDialog } from "./dialog";

// Duplicate, delete (only while unused, with a confirmation) and export links
// for one curve, on the library list and in the editor.

export function ExportLinks({ curveId }: { curveId: string }) {
  return (
    <span className="inline-flex gap-2 text-sm">
      <a href={`${curveUrl(curveId)}/export?format=json`} download className="text-accent-700 underline-offset-2 hover:underline">
        Export JSON
      </a>
      <a href={`${curveUrl(curveId)}/export?format=csv`} download className="text-accent-700 underline-offset-2 hover:underline">
        Export CSV
      </a>
    </span>
  );
}

export function CurveActions({
  curve,
  canEdit = "may" in curve ? (curve as CurveDetailDto).may.edit : true,
  onDuplicated,
  onDeleted,
}: {
  curve: CurveSummaryDto | CurveDetailDto;
  canEdit?: boolean;
  onDuplicated?: (id: string) => void;
  onDeleted?: () => void;
}) {
  const { mutate } = useSWRConfig();
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [confirming, setConfirming] = useState(false);

  async function duplicate() {
    setBusy(true);
    setError(null);
    try {
      const copy = await sendJson<CurveDetailDto>(`${curveUrl(curve.id)}/duplicate`, "POST", {});
      await mutate(curvesUrl);
      onDuplicated?.(copy.id);
    } catch (e) {
      setError(e instanceof ApiError ? e.message : "The curve could not be duplicated.");
    } finally {
      setBusy(false);
    }
  }

  async function remove() {
    setBusy(true);
    setError(null);
    try {
      await sendJson(`${curveUrl(curve.id)}?version=${curve.version}`, "DELETE");
      setConfirming(false);
      // Drop the deleted curve from the list at once, then read the list again.
      await mutate(curvesUrl, (list: { items: CurveSummaryDto[] } | undefined) => list && { items: list.items.filter((c) => c.id !== curve.id) }, { revalidate: true });
      onDeleted?.();
    } catch (e) {
      setError(e instanceof ApiError ? e.message : "The curve could not be deleted.");
      setConfirming(false);
    } finally {
      setBusy(false);
    }
  }

  const attached = curve.attachedCount > 0;
  return (
    <div className="flex flex-col items-end gap-1">
      <div className="flex flex-wrap items-center justify-end gap-2">
        <ExportLinks curveId={curve.id} />
        {canEdit ? (
          <>
            <button type="button" onClick={duplicate} disabled={busy} className="rounded-md px-3 py-1 text-sm ring-1 ring-slate-300 hover:bg-slate-50 disabled:opacity-40">
              Duplicate
            </button>
            <button
              type="button"
              onClick={() => setConfirming(true)}
              disabled={busy || attached}
              title={attached ? `Attached ${curve.attachedCount}×: detach it on the zone boards first.` : undefined}
              aria-describedby={attached ? `delete-hint-${curve.id}` : undefined}
              className="rounded-md px-3 py-1 text-sm text-danger-700 ring-1 ring-danger-600/40 hover:bg-danger-50 disabled:opacity-40"
            >
              Delete
            </button>
            {attached ? (
              <span id={`delete-hint-${curve.id}`} className="sr-only">
                Cannot delete: attached {curve.attachedCount} times.
              </span>
            ) : null}
          </>
        ) : null}
      </div>
      {error ? (
        <p role="alert" className="max-w-md text-right text-sm text-danger-700">
          {error}
        </p>
      ) : null}
      <AudioDialog open={confirming} onOpenChange={setConfirming} title={`Delete “${curve.name}”?`} description="The curve and its bands are removed from the library. This cannot be undone.">
        <div className="flex justify-end gap-2">
          <button type="button" onClick={() => setConfirming(false)} className="rounded-md px-3 py-1.5 text-sm ring-1 ring-slate-300">
            Keep it
          </button>
          <button type="button" onClick={remove} disabled={busy} className="rounded-md bg-danger-600 px-3 py-1.5 text-sm font-medium text-white disabled:opacity-40">
            {busy ? "Deleting…" : "Delete curve"}
          </button>
        </div>
      </AudioDialog>
    </div>
  );
}

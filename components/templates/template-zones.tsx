"use client";
import Link from "next/link";
import { useState } from "react";
import { DialogShell, FormError } from "@/components/board/dialog-shell";
import type { TemplateDetailDto, TemplateZoneDto } from "@/db/queries/templates";
import { sendJson } from "@/lib/fetcher";
import { isOverridden } from "@/lib/zones/override-paths";
import { Badge, buttonClass, errorText, primaryButtonClass } from "./ui";

/** The groups of fields a zone can set itself, in the words of the preview. */
export const overrideGroups: { path: string; label: string }[] = [
  { path: "volumeCeiling", label: "Volume ceiling" },
  { path: "turnOnVolume", label: "Turn-on volume" },
  { path: "guestControls", label: "Guest controls" },
  { path: "zoneCurve", label: "Zone tone curve" },
  { path: "sources", label: "Sources (names, offsets, curves)" },
  { path: "sources.order", label: "Order of sources" },
  { path: "presets", label: "Favourite stations (all)" },
  { path: "presets.order", label: "Order of favourite stations" },
  { path: "outputLayout.crossover", label: "Crossover" },
  { path: "outputLayout.outputs", label: "Outputs (distances, delays, trims)" },
  { path: "deviceSettings", label: "Device settings" },
];

function labelOf(path: string) {
  return overrideGroups.find((g) => g.path === path)?.label ?? path;
}

function OverridesDialog({ templateId, zone, onClose, onSaved }: { templateId: string; zone: TemplateZoneDto; onClose: () => void; onSaved: () => void }) {
  const [chosen, setChosen] = useState<string[]>(zone.overrides);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const finer = zone.overrides.filter((p) => !overrideGroups.some((g) => g.path === p));
  const toggle = (path: string, on: boolean) => setChosen((c) => (on ? [...c, path] : c.filter((p) => p !== path)));

  async function save(event: React.FormEvent) {
    event.preventDefault();
    setBusy(true);
    setError(null);
    try {
      await sendJson(`/api/templates/${templateId}/zones/${zone.zoneId}/overrides`, "PUT", { version: zone.version, overrides: chosen });
      onSaved();
    } catch (e) {
      setError(errorText(e));
      setBusy(false);
    }
  }

  return (
    <DialogShell open onOpenChange={(o) => (o ? undefined : onClose())} title={`Fields “${zone.zoneName}” sets itself`}
      description="Template updates keep these as the zone has them, and the preview says so." testId="overrides-dialog">
      <form onSubmit={save} className="space-y-3">
        <FormError message={error} />
        <fieldset className="grid gap-1 sm:grid-cols-2">
          <legend className="sr-only">Fields set in this zone</legend>
          {[...overrideGroups.map((g) => g.path), ...finer].map((path) => (
            <label key={path} className="inline-flex items-center gap-2 text-sm">
              <input type="checkbox" checked={chosen.includes(path)} onChange={(e) => toggle(path, e.target.checked)} />
              {labelOf(path)}
              {!chosen.includes(path) && isOverridden(path, chosen) ? <span className="text-xs text-slate-500">(covered)</span> : null}
            </label>
          ))}
        </fieldset>
        <div className="flex justify-end gap-2">
          <button type="button" className={buttonClass} onClick={onClose}>Cancel</button>
          <button type="submit" className={primaryButtonClass} disabled={busy}>{busy ? "Saving…" : "Save"}</button>
        </div>
      </form>
    </DialogShell>
  );
}

/** The zones made from this template, with their template version and the fields each sets itself. */
export function TemplateZones({ template, onChanged }: { template: TemplateDetailDto; onChanged: () => void }) {
  const [editing, setEditing] = useState<TemplateZoneDto | null>(null);
  if (template.zones.length === 0) {
    return <p className="text-sm text-slate-600">No zone is made from this template yet.</p>;
  }
  return (
    <>
      <div className="overflow-x-auto rounded-lg border border-slate-200 bg-white">
        <table className="w-full text-left text-sm" data-testid="template-zones">
          <caption className="sr-only">Zones made from this template</caption>
          <thead className="bg-slate-50 text-xs uppercase tracking-wide text-slate-500">
            <tr>
              <th scope="col" className="px-3 py-2">Zone</th>
              <th scope="col" className="px-3 py-2">Home</th>
              <th scope="col" className="px-3 py-2">Template version</th>
              <th scope="col" className="px-3 py-2">Set in the zone (kept on update)</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-slate-100">
            {template.zones.map((z) => (
              <tr key={z.zoneId}>
                <td className="px-3 py-2 font-medium">{z.zoneName}</td>
                <td className="px-3 py-2"><Link href={`/homes/${z.home.id}`} className="text-accent-700 hover:underline">{z.home.name}</Link></td>
                <td className="px-3 py-2">
                  v{z.templateVersion ?? "?"} {z.behind ? <Badge tone="caution">behind v{template.version}</Badge> : <Badge tone="accent">up to date</Badge>}
                </td>
                <td className="px-3 py-2">
                  <div className="flex flex-wrap items-center gap-1">
                    {z.overrides.length === 0 ? <span className="text-slate-500">nothing</span> : null}
                    {z.overrides.map((p) => <Badge key={p}>{labelOf(p)}</Badge>)}
                    {z.canApply ? (
                      <button type="button" className="ml-1 rounded px-1.5 text-xs text-accent-700 underline" onClick={() => setEditing(z)}
                        aria-label={`Choose the fields ${z.zoneName} in ${z.home.name} sets itself`}>
                        change
                      </button>
                    ) : null}
                  </div>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {editing ? (
        <OverridesDialog templateId={template.id} zone={editing} onClose={() => setEditing(null)}
          onSaved={() => {
            setEditing(null);
            onChanged();
          }} />
      ) : null}
    </>
  );
}

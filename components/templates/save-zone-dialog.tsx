"use client";
import { useEffect, useState } from "react";
import useSWR from "swr";
import { DialogShell, FieldError, FormError, inputClass, labelClass } from "@/components/board/dialog-shell";
import type { HomeListDto } from "@/db/queries/homes";
import type { TemplateSummaryDto } from "@/db/queries/templates";
import { sendJson, type ApiError } from "@/lib/fetcher";
import { buttonClass, errorText, fieldErrorsOf, primaryButtonClass } from "./ui";

/** Save one zone's configuration as a new template: find the home, pick the zone, name it. */
export function SaveZoneDialog({ onClose, onDone }: { onClose: () => void; onDone: (id: string) => void }) {
  const [search, setSearch] = useState("");
  const [debounced, setDebounced] = useState("");
  const [homeId, setHomeId] = useState("");
  const [zoneId, setZoneId] = useState("");
  const [name, setName] = useState("");
  const [description, setDescription] = useState("");
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string[]>>({});

  useEffect(() => {
    const t = setTimeout(() => setDebounced(search), 250);
    return () => clearTimeout(t);
  }, [search]);

  const homesKey = `/api/homes?${new URLSearchParams({ search: debounced, sort: "name", dir: "asc", page: "1", pageSize: "20" })}`;
  const { data: homeList } = useSWR<HomeListDto, ApiError>(homesKey, { keepPreviousData: true });
  const { data: zoneList, error: zonesError } = useSWR<{ items: { id: string; name: string; templateName: string | null }[] }, ApiError>(
    homeId ? `/api/templates/zone-choices?homeId=${homeId}` : null,
  );

  async function submit(event: React.FormEvent) {
    event.preventDefault();
    setBusy(true);
    setError(null);
    setFieldErrors({});
    try {
      const made = await sendJson<TemplateSummaryDto>("/api/templates", "POST", { zoneId, name, description });
      onDone(made.id);
    } catch (e) {
      setError(errorText(e));
      setFieldErrors(fieldErrorsOf(e));
      setBusy(false);
    }
  }

  return (
    <DialogShell open onOpenChange={(o) => (o ? undefined : onClose())} title="Save a zone as a template"
      description="Its sources, stations, offsets, tone curves, ceilings, guest controls and output layout become a template (version 1). The zone itself does not change."
      wide testId="save-zone-dialog">
      <form onSubmit={submit} noValidate className="space-y-3">
        <FormError message={error} />
        <div className="grid gap-3 sm:grid-cols-2">
          <div>
            <label htmlFor="save-home-search" className={labelClass}>Find the home</label>
            <input id="save-home-search" type="search" className={inputClass} value={search} onChange={(e) => setSearch(e.target.value)} placeholder="Home, household or city" />
            <label htmlFor="save-home" className="sr-only">Home</label>
            <select id="save-home" className={inputClass} value={homeId} onChange={(e) => { setHomeId(e.target.value); setZoneId(""); }}>
              <option value="">Choose a home…</option>
              {homeList?.items.map((h) => <option key={h.id} value={h.id}>{h.name} ({h.zoneCount} zones)</option>)}
            </select>
          </div>
          <div>
            <label htmlFor="save-zone" className={labelClass}>Zone</label>
            <select id="save-zone" className={inputClass} value={zoneId} onChange={(e) => setZoneId(e.target.value)} disabled={!homeId}
              aria-invalid={Boolean(fieldErrors.zoneId)} aria-describedby="save-zone-error">
              <option value="">{homeId ? "Choose a zone…" : "Choose a home first"}</option>
              {zoneList?.items.map((z) => (
                <option key={z.id} value={z.id}>{z.name}{z.templateName ? ` (from “${z.templateName}”)` : ""}</option>
              ))}
            </select>
            <FieldError id="save-zone-error" messages={fieldErrors.zoneId ?? (zonesError ? [zonesError.message] : undefined)} />
          </div>
        </div>
        <div>
          <label htmlFor="save-name" className={labelClass}>Template name</label>
          <input id="save-name" className={inputClass} value={name} onChange={(e) => setName(e.target.value)}
            aria-invalid={Boolean(fieldErrors.name)} aria-describedby="save-name-error" />
          <FieldError id="save-name-error" messages={fieldErrors.name} />
        </div>
        <div>
          <label htmlFor="save-description" className={labelClass}>Description</label>
          <textarea id="save-description" rows={3} className={inputClass} value={description} onChange={(e) => setDescription(e.target.value)}
            placeholder="Where it suits, what it assumes (speakers, room, inputs)." />
          <FieldError id="save-description-error" messages={fieldErrors.description} />
        </div>
        <div className="flex justify-end gap-2">
          <button type="button" onClick={onClose} className={buttonClass}>Cancel</button>
          <button type="submit" disabled={busy || !zoneId} className={primaryButtonClass}>{busy ? "Saving…" : "Save as template"}</button>
        </div>
      </form>
    </DialogShell>
  );
}

"use client";
import Link from "next/link";
import { useEffect, useState } from "react";
import useSWR from "swr";
import { Caution, DialogShell, FieldError, FormError, inputClass, labelClass } from "@/components/board/dialog-shell";
import type { AppliedTemplateDto, TemplateSummaryDto, TemplateTargetsDto } from "@/db/queries/templates";
import { sendJson, type ApiError } from "@/lib/fetcher";
import { applyTemplateSchema } from "@/lib/validation/templates";
import { buttonClass, errorText, fieldErrorsOf, primaryButtonClass } from "./ui";

type Where = "existing" | "new";

/**
 * Make a zone from a template in a few clicks: a home (one of yours, or a new
 * one), a name, and a free device that can take it.
 */
export function ApplyTemplateDialog({
  template,
  onClose,
  onDone,
}: {
  template: Pick<TemplateSummaryDto, "id" | "name" | "version">;
  onClose: () => void;
  onDone?: (result: AppliedTemplateDto) => void;
}) {
  const [where, setWhere] = useState<Where>("existing");
  const [homeId, setHomeId] = useState("");
  const [newHome, setNewHome] = useState({ name: "", householdName: "", city: "" });
  const [zoneName, setZoneName] = useState("");
  const [deviceId, setDeviceId] = useState("");
  const [busy, setBusy] = useState(false);
  const [formError, setFormError] = useState<string | null>(null);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string[]>>({});
  const [done, setDone] = useState<AppliedTemplateDto | null>(null);

  const key = `/api/templates/${template.id}/targets${where === "existing" && homeId ? `?homeId=${homeId}` : ""}`;
  const { data: targets, error: targetsError, isLoading } = useSWR<TemplateTargetsDto, ApiError>(key, { keepPreviousData: true });

  useEffect(() => {
    if (!targets) return;
    if (targets.homes.length === 0 && targets.canCreateHome) setWhere("new");
  }, [targets]);
  // A device that is no longer offered (another home chosen) is no longer chosen.
  useEffect(() => {
    if (targets && deviceId && !targets.devices.some((d) => d.id === deviceId && d.problems.length === 0)) setDeviceId("");
  }, [targets, deviceId]);

  async function submit(event: React.FormEvent) {
    event.preventDefault();
    const body = {
      zoneName,
      deviceId,
      ...(where === "existing" ? { homeId: homeId || undefined } : { newHome }),
    };
    const parsed = applyTemplateSchema.safeParse(body);
    if (!parsed.success) {
      const errs: Record<string, string[]> = {};
      for (const issue of parsed.error.issues) (errs[issue.path.join(".") || "_"] ??= []).push(issue.message);
      setFieldErrors(errs);
      setFormError("Some fields need attention.");
      return;
    }
    setBusy(true);
    setFormError(null);
    setFieldErrors({});
    try {
      const result = await sendJson<AppliedTemplateDto>(`/api/templates/${template.id}/apply`, "POST", parsed.data);
      setDone(result);
      onDone?.(result);
    } catch (error) {
      setFormError(errorText(error));
      setFieldErrors(fieldErrorsOf(error));
    } finally {
      setBusy(false);
    }
  }

  const usable = targets?.devices.filter((d) => d.problems.length === 0) ?? [];
  const unusable = targets?.devices.filter((d) => d.problems.length > 0) ?? [];

  return (
    <DialogShell
      open
      onOpenChange={(o) => (o ? undefined : onClose())}
      title={`Use “${template.name}” in a home`}
      description={`A new zone with this template’s configuration (version ${template.version}), bound to a free device.`}
      wide
      testId="apply-template-dialog"
    >
      {done ? (
        <div className="space-y-3" data-testid="apply-done">
          <p role="status" className="rounded-md bg-accent-50 px-3 py-2 text-sm text-accent-700">
            Made zone “{done.zoneName}” in {done.home.name}
            {done.home.created ? " (new home)" : ""}. Revision {done.revision.number} is saved and ready to push.
          </p>
          <div className="flex justify-end gap-2">
            <button type="button" className={buttonClass} onClick={onClose}>Close</button>
            <Link href={`/homes/${done.home.id}`} className={primaryButtonClass}>Open {done.home.name}</Link>
          </div>
        </div>
      ) : (
        <form onSubmit={submit} noValidate className="space-y-4">
          <FormError message={formError} />
          {targetsError ? <FormError message={`Homes and devices could not be loaded: ${targetsError.message}`} /> : null}

          <fieldset>
            <legend className={labelClass}>Home</legend>
            <div className="mt-1 flex flex-wrap gap-4 text-sm">
              <label className="inline-flex items-center gap-2">
                <input type="radio" name="where" value="existing" checked={where === "existing"} onChange={() => setWhere("existing")}
                  disabled={targets ? targets.homes.length === 0 : false} />
                A home I work on
              </label>
              {targets?.canCreateHome !== false ? (
                <label className="inline-flex items-center gap-2">
                  <input type="radio" name="where" value="new" checked={where === "new"} onChange={() => setWhere("new")} />
                  A new home
                </label>
              ) : null}
            </div>
            {where === "existing" ? (
              <div className="mt-2">
                <label htmlFor="apply-home" className="sr-only">Home</label>
                <select id="apply-home" value={homeId} onChange={(e) => setHomeId(e.target.value)} className={inputClass}
                  aria-invalid={Boolean(fieldErrors.homeId)} aria-describedby="apply-home-error">
                  <option value="">Choose a home…</option>
                  {targets?.homes.map((h) => <option key={h.id} value={h.id}>{h.name} — {h.householdName}</option>)}
                </select>
                <FieldError id="apply-home-error" messages={fieldErrors.homeId} />
              </div>
            ) : (
              <div className="mt-2 grid gap-3 sm:grid-cols-3">
                <div>
                  <label htmlFor="new-home-name" className={labelClass}>Home name</label>
                  <input id="new-home-name" className={inputClass} value={newHome.name} onChange={(e) => setNewHome({ ...newHome, name: e.target.value })}
                    aria-invalid={Boolean(fieldErrors["newHome.name"])} aria-describedby="new-home-name-error" />
                  <FieldError id="new-home-name-error" messages={fieldErrors["newHome.name"]} />
                </div>
                <div>
                  <label htmlFor="new-home-household" className={labelClass}>Household</label>
                  <input id="new-home-household" className={inputClass} value={newHome.householdName}
                    onChange={(e) => setNewHome({ ...newHome, householdName: e.target.value })}
                    aria-invalid={Boolean(fieldErrors["newHome.householdName"])} aria-describedby="new-home-household-error" />
                  <FieldError id="new-home-household-error" messages={fieldErrors["newHome.householdName"]} />
                </div>
                <div>
                  <label htmlFor="new-home-city" className={labelClass}>City</label>
                  <input id="new-home-city" className={inputClass} value={newHome.city} onChange={(e) => setNewHome({ ...newHome, city: e.target.value })} />
                </div>
              </div>
            )}
          </fieldset>

          <div>
            <label htmlFor="apply-zone-name" className={labelClass}>Zone name</label>
            <input id="apply-zone-name" className={inputClass} value={zoneName} onChange={(e) => setZoneName(e.target.value)}
              placeholder="Patio, Dock, Family room…" aria-invalid={Boolean(fieldErrors.zoneName)} aria-describedby="apply-zone-name-error" />
            <FieldError id="apply-zone-name-error" messages={fieldErrors.zoneName} />
          </div>

          <fieldset>
            <legend className={labelClass}>Device</legend>
            {isLoading && !targets ? <p className="mt-1 text-sm text-slate-500" role="status">Looking for free devices…</p> : null}
            {targets && targets.devices.length === 0 ? (
              <p className="mt-1 text-sm text-slate-600">No free device: every device of your company already drives a zone or is installed in another home.</p>
            ) : null}
            <ul className="mt-1 space-y-1" data-testid="device-choices">
              {usable.map((d) => (
                <li key={d.id}>
                  <label className="flex cursor-pointer items-start gap-2 rounded-md px-2 py-1.5 text-sm hover:bg-slate-50">
                    <input type="radio" name="device" value={d.id} checked={deviceId === d.id} onChange={() => setDeviceId(d.id)} className="mt-1" />
                    <span>
                      <span className="font-medium">{d.serial}</span> · {d.modelName}
                      <span className="block text-xs text-slate-500">
                        {d.homeId ? "Installed in this home" : "Not installed yet"} · {d.online ? "online" : "offline — the zone is saved and reaches the device when it is back"}
                      </span>
                    </span>
                  </label>
                </li>
              ))}
              {unusable.map((d) => (
                <li key={d.id} className="flex items-start gap-2 rounded-md px-2 py-1.5 text-sm text-slate-500">
                  <input type="radio" name="device" value={d.id} disabled className="mt-1" aria-describedby={`why-${d.id}`} aria-label={`${d.serial} cannot take this template`} />
                  <span>
                    <span className="font-medium">{d.serial}</span> · {d.modelName}
                    <span id={`why-${d.id}`} className="block text-xs">Cannot take this template: {d.problems.join(" ")}</span>
                  </span>
                </li>
              ))}
            </ul>
            <FieldError id="apply-device-error" messages={fieldErrors.deviceId} />
          </fieldset>

          <Caution>Speaker wiring, mounting and any mains work follow local codes and licensed practice. Check the volume ceiling suits the room before the first push.</Caution>

          <div className="flex justify-end gap-2">
            <button type="button" onClick={onClose} className={buttonClass}>Cancel</button>
            <button type="submit" disabled={busy} className={primaryButtonClass}>{busy ? "Making the zone…" : "Make the zone"}</button>
          </div>
        </form>
      )}
    </DialogShell>
  );
}

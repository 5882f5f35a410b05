"use client";
import { useEffect, useId, useState, type FormEvent } from "react";
import { volumeCeilingCaution } from "@/lib/board/cautions";
import type { ZoneColumnDto } from "@/lib/board/types";
import { zoneSettingsSchema, type ZoneSettings } from "@/lib/validation/board";
import { Caution, DialogButtons, DialogShell, FieldError, FormError, inputClass, labelClass } from "./dialog-shell";
import { toNumber, zodFieldErrors, type FieldErrors } from "./form-utils";
import type { WriteOutcome } from "./use-board";

interface Draft {
  name: string;
  ceiling: string;
  turnOn: string;
  volume: boolean;
  source: boolean;
  wake: boolean;
  standby: string;
  brightness: string;
  cecPower: boolean;
  cecVolume: boolean;
  trigger12v: boolean;
}

function draftOf(zone: ZoneColumnDto): Draft {
  return {
    name: zone.name,
    ceiling: String(zone.volumeCeiling),
    turnOn: String(zone.turnOnVolume),
    volume: zone.guest.volume,
    source: zone.guest.source,
    wake: zone.guest.wake,
    standby: String(zone.deviceSettings.standbyMinutes),
    brightness: String(zone.deviceSettings.displayBrightness),
    cecPower: zone.deviceSettings.cecPower,
    cecVolume: zone.deviceSettings.cecVolume,
    trigger12v: zone.deviceSettings.trigger12v,
  };
}

export function settingsOf(zone: ZoneColumnDto): ZoneSettings {
  return {
    name: zone.name,
    volumeCeiling: zone.volumeCeiling,
    turnOnVolume: zone.turnOnVolume,
    guestControls: { volume: zone.guest.volume, source: zone.guest.source, wake: zone.guest.wake },
    deviceSettings: zone.deviceSettings,
  };
}

/** Only what changed, so a save never touches guest controls it did not mean to. */
export function changedSettings(before: ZoneSettings, after: ZoneSettings): Partial<ZoneSettings> {
  const out: Partial<ZoneSettings> = {};
  for (const key of Object.keys(after) as (keyof ZoneSettings)[]) {
    if (JSON.stringify(before[key]) !== JSON.stringify(after[key])) Object.assign(out, { [key]: after[key] });
  }
  return out;
}

/** A zone's name, volume ceiling and turn-on volume, guest controls and device settings. */
export function ZoneDialog({
  open,
  onOpenChange,
  zone,
  guestRefusal,
  onSave,
}: {
  open: boolean;
  onOpenChange: (open: boolean) => void;
  zone: ZoneColumnDto;
  /** Why guest controls cannot be changed here (role or lock), or null. */
  guestRefusal: string | null;
  onSave: (patch: Partial<ZoneSettings>) => Promise<WriteOutcome>;
}) {
  const uid = useId();
  const [draft, setDraft] = useState<Draft>(() => draftOf(zone));
  const [errors, setErrors] = useState<FieldErrors>({});
  const [formError, setFormError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  useEffect(() => {
    if (open) {
      setDraft(draftOf(zone));
      setErrors({});
      setFormError(null);
    }
    // Reset only when the dialog opens, not on every board refresh behind it.
  }, [open]);

  const candidate = {
    name: draft.name,
    volumeCeiling: toNumber(draft.ceiling),
    turnOnVolume: toNumber(draft.turnOn),
    guestControls: { volume: draft.volume, source: draft.source, wake: draft.wake },
    deviceSettings: {
      standbyMinutes: toNumber(draft.standby),
      displayBrightness: toNumber(draft.brightness),
      cecPower: draft.cecPower,
      cecVolume: draft.cecVolume,
      trigger12v: draft.trigger12v,
    },
  };
  // Turn-on above the ceiling shows at once, beside the field.
  const liveTurnOn =
    Number.isFinite(candidate.turnOnVolume) && Number.isFinite(candidate.volumeCeiling) && candidate.turnOnVolume > candidate.volumeCeiling
      ? [`The turn-on volume cannot be above the ceiling (${candidate.volumeCeiling} %).`]
      : undefined;
  const ceilingCaution = Number.isFinite(candidate.volumeCeiling) ? volumeCeilingCaution(candidate.volumeCeiling) : null;

  async function submit(event: FormEvent) {
    event.preventDefault();
    setFormError(null);
    const parsed = zoneSettingsSchema.safeParse(candidate);
    if (!parsed.success) {
      setErrors(zodFieldErrors(parsed.error));
      return;
    }
    setErrors({});
    const patch = changedSettings(settingsOf(zone), parsed.data);
    if (Object.keys(patch).length === 0) {
      onOpenChange(false);
      return;
    }
    setBusy(true);
    const outcome = await onSave(patch);
    setBusy(false);
    if (outcome.ok) {
      onOpenChange(false);
      return;
    }
    setErrors(outcome.error?.fieldErrors ?? {});
    setFormError(outcome.error?.message ?? "Not saved.");
  }

  const field = (name: string) => ({
    id: `${uid}-${name}`,
    "aria-invalid": errors[name] ? true : undefined,
    "aria-describedby": errors[name] ? `${uid}-${name}-error` : undefined,
  });
  /** A whole-number field; `key` is the schema path its errors come back under. */
  const num = (name: keyof Draft, key: string, min: number, max: number, extraErrors?: string[]) => ({
    id: `${uid}-${key}`,
    "aria-invalid": errors[key] || extraErrors ? true : undefined,
    "aria-describedby": errors[key] || extraErrors ? `${uid}-${key}-error` : undefined,
    type: "number" as const,
    inputMode: "numeric" as const,
    min,
    max,
    step: 1,
    className: inputClass,
    value: draft[name] as string,
    onChange: (e: React.ChangeEvent<HTMLInputElement>) => setDraft({ ...draft, [name]: e.target.value }),
  });

  return (
    <DialogShell open={open} onOpenChange={onOpenChange} title={`Zone “${zone.name}”`} description="Levels, guest controls and device settings." wide testId="zone-dialog">
      <form onSubmit={submit} noValidate>
        <FormError message={formError} />
        <div className="grid gap-4 sm:grid-cols-3">
          <div className="sm:col-span-3">
            <label htmlFor={`${uid}-name`} className={labelClass}>Name</label>
            <input {...field("name")} className={inputClass} value={draft.name} onChange={(e) => setDraft({ ...draft, name: e.target.value })} />
            <FieldError id={`${uid}-name-error`} messages={errors.name} />
          </div>
          <div>
            <label htmlFor={`${uid}-volumeCeiling`} className={labelClass}>Volume ceiling (%)</label>
            <input {...num("ceiling", "volumeCeiling", 5, 100)} />
            <FieldError id={`${uid}-volumeCeiling-error`} messages={errors.volumeCeiling} />
          </div>
          <div>
            <label htmlFor={`${uid}-turnOnVolume`} className={labelClass}>Turn-on volume (%)</label>
            <input {...num("turnOn", "turnOnVolume", 0, 100, liveTurnOn)} />
            <FieldError id={`${uid}-turnOnVolume-error`} messages={errors.turnOnVolume ?? liveTurnOn} />
          </div>
        </div>
        {ceilingCaution ? <Caution testId="ceiling-caution">{ceilingCaution}</Caution> : null}

        <fieldset className="mt-5" disabled={guestRefusal !== null}>
          <legend className="text-sm font-semibold">Guest controls — phones and apps on the home network may…</legend>
          {guestRefusal ? <p className="mt-1 text-xs text-caution-700">{guestRefusal}</p> : null}
          <div className="mt-2 flex flex-wrap gap-4 text-sm">
            <label className="flex items-center gap-2">
              <input type="checkbox" disabled={guestRefusal !== null} checked={draft.volume} onChange={(e) => setDraft({ ...draft, volume: e.target.checked })} /> change the volume
            </label>
            <label className="flex items-center gap-2">
              <input type="checkbox" disabled={guestRefusal !== null} checked={draft.source} onChange={(e) => setDraft({ ...draft, source: e.target.checked })} /> switch the source
            </label>
            <label className="flex items-center gap-2">
              <input type="checkbox" disabled={guestRefusal !== null} checked={draft.wake} onChange={(e) => setDraft({ ...draft, wake: e.target.checked })} /> wake the zone
            </label>
          </div>
        </fieldset>

        <fieldset className="mt-5">
          <legend className="text-sm font-semibold">Device settings</legend>
          <div className="mt-2 grid gap-4 sm:grid-cols-3">
            <div>
              <label htmlFor={`${uid}-deviceSettings.standbyMinutes`} className={labelClass}>Standby after (minutes)</label>
              <input {...num("standby", "deviceSettings.standbyMinutes", 0, 240)} />
              <p className="mt-1 text-xs text-slate-500">0 = never.</p>
              <FieldError id={`${uid}-deviceSettings.standbyMinutes-error`} messages={errors["deviceSettings.standbyMinutes"]} />
            </div>
            <div>
              <label htmlFor={`${uid}-deviceSettings.displayBrightness`} className={labelClass}>Display brightness (%)</label>
              <input {...num("brightness", "deviceSettings.displayBrightness", 0, 100)} />
              <FieldError id={`${uid}-deviceSettings.displayBrightness-error`} messages={errors["deviceSettings.displayBrightness"]} />
            </div>
          </div>
          <div className="mt-3 flex flex-wrap gap-4 text-sm">
            <label className="flex items-center gap-2">
              <input type="checkbox" checked={draft.cecPower} onChange={(e) => setDraft({ ...draft, cecPower: e.target.checked })} /> Follow HDMI-CEC power
            </label>
            <label className="flex items-center gap-2">
              <input type="checkbox" checked={draft.cecVolume} onChange={(e) => setDraft({ ...draft, cecVolume: e.target.checked })} /> Follow HDMI-CEC volume
            </label>
            <label className="flex items-center gap-2">
              <input type="checkbox" checked={draft.trigger12v} onChange={(e) => setDraft({ ...draft, trigger12v: e.target.checked })} /> 12 V trigger out
            </label>
          </div>
        </fieldset>
        <DialogButtons onCancel={() => onOpenChange(false)} submitLabel="Save zone" busy={busy} />
      </form>
    </DialogShell>
  );
}

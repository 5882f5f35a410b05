"use client";
import { useEffect, useId, useState, type FormEvent } from "react";
import { chainBoostDb, clipCaution } from "@/lib/board/cautions";
import type { BoardCurveDto, SourceCardDto, ZoneColumnDto } from "@/lib/board/types";
import { sourceKindLabels, sourceKinds, type SourceKind } from "@/lib/devices/model-profiles";
import { LOUDNESS_OFFSET, sourceFormSchema, type SourceForm } from "@/lib/validation/board";
import { Caution, DialogButtons, DialogShell, FieldError, FormError, inputClass, labelClass } from "./dialog-shell";
import { toNumber, zodFieldErrors, type FieldErrors } from "./form-utils";
import type { WriteOutcome } from "./use-board";

interface Draft {
  label: string;
  kind: SourceKind;
  enabled: boolean;
  offset: string;
  toneCurveId: string;
  subsonic: boolean;
}

function draftOf(source?: SourceCardDto, zone?: ZoneColumnDto): Draft {
  return {
    label: source?.label ?? "",
    kind: source?.kind ?? zone?.device?.profile.inputs[0] ?? "analog",
    enabled: source?.enabled ?? true,
    offset: String(source?.loudnessOffsetDb ?? 0),
    toneCurveId: source?.toneCurveId ?? "",
    subsonic: source?.subsonic ?? false,
  };
}

/** Add or edit a source: label, kind, enabled, loudness offset, tone curve, subsonic filter. */
export function SourceDialog({
  open,
  onOpenChange,
  zone,
  curves,
  source,
  onSave,
  onRemove,
}: {
  open: boolean;
  onOpenChange: (open: boolean) => void;
  zone: ZoneColumnDto;
  curves: BoardCurveDto[];
  source?: SourceCardDto;
  onSave: (values: SourceForm) => Promise<WriteOutcome>;
  onRemove?: () => Promise<WriteOutcome>;
}) {
  const uid = useId();
  const [draft, setDraft] = useState<Draft>(() => draftOf(source, zone));
  const [errors, setErrors] = useState<FieldErrors>({});
  const [formError, setFormError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [confirmRemove, setConfirmRemove] = useState(false);

  useEffect(() => {
    if (open) {
      setDraft(draftOf(source, zone));
      setErrors({});
      setFormError(null);
      setConfirmRemove(false);
    }
    // Reset only when the dialog opens, not on every board refresh behind it.
  }, [open]);

  const inputs = zone.device?.profile.inputs ?? [...sourceKinds];
  const zoneCurve = curves.find((c) => c.id === zone.toneCurveId) ?? null;
  const chosenCurve = curves.find((c) => c.id === draft.toneCurveId) ?? null;
  const offset = toNumber(draft.offset);
  const caution = Number.isFinite(offset)
    ? clipCaution({
        loudnessOffsetDb: offset,
        chainBoostDb: chainBoostDb(zoneCurve?.bands ?? null, chosenCurve?.bands ?? null),
        truePeakDbtp: source?.truePeakDbtp ?? null,
      })
    : null;

  function values() {
    return {
      label: draft.label,
      kind: draft.kind,
      enabled: draft.enabled,
      loudnessOffsetDb: offset,
      toneCurveId: draft.toneCurveId || null,
      subsonic: draft.subsonic,
    };
  }

  async function submit(event: FormEvent) {
    event.preventDefault();
    setFormError(null);
    const parsed = sourceFormSchema.safeParse(values());
    const local: FieldErrors = parsed.success ? {} : zodFieldErrors(parsed.error);
    // The device's own inputs; a kind it already had stays allowed.
    if (!inputs.includes(draft.kind) && draft.kind !== source?.kind) {
      (local.kind ??= []).push(`This device has no ${sourceKindLabels[draft.kind]} input.`);
    }
    setErrors(local);
    if (!parsed.success || Object.keys(local).length) return;
    setBusy(true);
    const outcome = await onSave(parsed.data);
    setBusy(false);
    if (outcome.ok) {
      onOpenChange(false);
      return;
    }
    setErrors(outcome.error?.fieldErrors ?? {});
    setFormError(outcome.error?.message ?? "Not saved.");
  }

  async function remove() {
    if (!onRemove) return;
    setBusy(true);
    const outcome = await onRemove();
    setBusy(false);
    if (outcome.ok) onOpenChange(false);
    else setFormError(outcome.error?.message ?? "Not removed.");
  }

  const field = (name: string) => ({
    id: `${uid}-${name}`,
    "aria-invalid": errors[name] ? true : undefined,
    "aria-describedby": errors[name] ? `${uid}-${name}-error` : undefined,
  });

  return (
    <DialogShell
      open={open}
      onOpenChange={onOpenChange}
      title={source ? `Source “${source.label}”` : `Add a source to ${zone.name}`}
      description={zone.device ? `${zone.device.profile.name}: inputs ${inputs.map((k) => sourceKindLabels[k]).join(", ")}.` : "No device is bound to this zone yet."}
      testId="source-dialog"
    >
      <form onSubmit={submit} noValidate>
        <FormError message={formError} />
        <div className="grid gap-4 sm:grid-cols-2">
          <div>
            <label htmlFor={`${uid}-label`} className={labelClass}>Label</label>
            <input {...field("label")} className={inputClass} value={draft.label} maxLength={60} onChange={(e) => setDraft({ ...draft, label: e.target.value })} />
            <FieldError id={`${uid}-label-error`} messages={errors.label} />
          </div>
          <div>
            <label htmlFor={`${uid}-kind`} className={labelClass}>Kind</label>
            <select {...field("kind")} className={inputClass} value={draft.kind} onChange={(e) => setDraft({ ...draft, kind: e.target.value as SourceKind })}>
              {sourceKinds.map((k) => (
                <option key={k} value={k} disabled={!inputs.includes(k) && k !== source?.kind}>
                  {sourceKindLabels[k]}
                  {!inputs.includes(k) ? " (not on this device)" : ""}
                </option>
              ))}
            </select>
            <FieldError id={`${uid}-kind-error`} messages={errors.kind} />
          </div>
          <div>
            <label htmlFor={`${uid}-loudnessOffsetDb`} className={labelClass}>Loudness offset (dB)</label>
            <div className="flex items-center gap-2">
              <input
                {...field("loudnessOffsetDb")}
                className={inputClass}
                type="number"
                inputMode="decimal"
                step={LOUDNESS_OFFSET.stepDb}
                min={LOUDNESS_OFFSET.minDb}
                max={LOUDNESS_OFFSET.maxDb}
                value={draft.offset}
                onChange={(e) => setDraft({ ...draft, offset: e.target.value })}
              />
              <span className="mt-1 text-sm text-slate-500">dB</span>
            </div>
            <p className="mt-1 text-xs text-slate-500">−24 to +12 dB in 0.5 dB steps.</p>
            <FieldError id={`${uid}-loudnessOffsetDb-error`} messages={errors.loudnessOffsetDb} />
          </div>
          <div>
            <label htmlFor={`${uid}-toneCurveId`} className={labelClass}>Tone curve</label>
            <select {...field("toneCurveId")} className={inputClass} value={draft.toneCurveId} onChange={(e) => setDraft({ ...draft, toneCurveId: e.target.value })}>
              <option value="">No curve</option>
              {curves.map((c) => (
                <option key={c.id} value={c.id}>{c.name} ({c.bands.length} band{c.bands.length === 1 ? "" : "s"})</option>
              ))}
            </select>
            <FieldError id={`${uid}-toneCurveId-error`} messages={errors.toneCurveId} />
          </div>
        </div>
        <div className="mt-4 space-y-2">
          <label className="flex items-center gap-2 text-sm">
            <input type="checkbox" checked={draft.enabled} onChange={(e) => setDraft({ ...draft, enabled: e.target.checked })} />
            Enabled (the household can choose it)
          </label>
          <label className="flex items-center gap-2 text-sm">
            <input type="checkbox" checked={draft.subsonic} onChange={(e) => setDraft({ ...draft, subsonic: e.target.checked })} />
            Subsonic filter — for turntables: removes rumble below about 20 Hz
          </label>
        </div>
        {caution ? <Caution testId="clip-caution">{caution.message}</Caution> : null}
        <DialogButtons
          onCancel={() => onOpenChange(false)}
          submitLabel={source ? "Save source" : "Add source"}
          busy={busy}
          extra={
            onRemove ? (
              confirmRemove ? (
                <span className="flex items-center gap-2 text-sm">
                  Remove this source?
                  <button type="button" onClick={remove} className="rounded-md bg-danger-600 px-2 py-1 text-white">Remove</button>
                  <button type="button" onClick={() => setConfirmRemove(false)} className="underline">Keep</button>
                </span>
              ) : (
                <button type="button" onClick={() => setConfirmRemove(true)} className="text-sm text-danger-700 underline">Remove source…</button>
              )
            ) : null
          }
        />
      </form>
    </DialogShell>
  );
}

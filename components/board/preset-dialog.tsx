"use client";
import { useEffect, useId, useState, type FormEvent } from "react";
import { chainBoostDb, clipCaution } from "@/lib/board/cautions";
import { slotsSentence } from "@/lib/board/rules";
import type { BoardCurveDto, PresetCardDto, ZoneColumnDto } from "@/lib/board/types";
import type { Station } from "@/lib/stations/api-schema";
import { LOUDNESS_OFFSET, presetFormSchema, type PresetForm } from "@/lib/validation/board";
import { Caution, DialogButtons, DialogShell, FieldError, FormError, inputClass, labelClass } from "./dialog-shell";
import { toNumber, zodFieldErrors, type FieldErrors } from "./form-utils";
import { StationFinder } from "./station-finder";
import type { WriteOutcome } from "./use-board";

interface Draft {
  name: string;
  streamUrl: string;
  genre: string;
  offset: string;
  toneCurveId: string;
  directoryId: string | null;
}

function draftOf(preset?: PresetCardDto): Draft {
  return {
    name: preset?.name ?? "",
    streamUrl: preset?.streamUrl ?? "",
    genre: preset?.genre ?? "",
    offset: String(preset?.loudnessOffsetDb ?? 0),
    toneCurveId: preset?.toneCurveId ?? "",
    directoryId: preset?.directoryId ?? null,
  };
}

export type PresetSaveValues = PresetForm & { directoryId: string | null };

/** Add or edit a stream preset; adding can start from a station found in the directory. */
export function PresetDialog({
  open,
  onOpenChange,
  zone,
  curves,
  preset,
  onSave,
  onRemove,
}: {
  open: boolean;
  onOpenChange: (open: boolean) => void;
  zone: ZoneColumnDto;
  curves: BoardCurveDto[];
  preset?: PresetCardDto;
  onSave: (values: PresetSaveValues) => Promise<WriteOutcome>;
  onRemove?: () => Promise<WriteOutcome>;
}) {
  const uid = useId();
  const [draft, setDraft] = useState<Draft>(() => draftOf(preset));
  const [errors, setErrors] = useState<FieldErrors>({});
  const [formError, setFormError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [confirmRemove, setConfirmRemove] = useState(false);

  useEffect(() => {
    if (open) {
      setDraft(draftOf(preset));
      setErrors({});
      setFormError(null);
      setConfirmRemove(false);
    }
    // Reset only when the dialog opens, not on every board refresh behind it.
  }, [open]);

  const full = !preset && zone.presets.length >= zone.presetSlots;
  const zoneCurve = curves.find((c) => c.id === zone.toneCurveId) ?? null;
  const chosenCurve = curves.find((c) => c.id === draft.toneCurveId) ?? null;
  const offset = toNumber(draft.offset);
  const caution = Number.isFinite(offset)
    ? clipCaution({
        loudnessOffsetDb: offset,
        chainBoostDb: chainBoostDb(zoneCurve?.bands ?? null, chosenCurve?.bands ?? null),
        truePeakDbtp: preset?.truePeakDbtp ?? null,
      })
    : null;

  function choose(station: Station) {
    setDraft((d) => ({ ...d, name: station.name, streamUrl: station.streamUrl, genre: station.genre, directoryId: station.id }));
    setErrors({});
  }

  async function submit(event: FormEvent) {
    event.preventDefault();
    setFormError(null);
    const parsed = presetFormSchema.safeParse({
      name: draft.name,
      streamUrl: draft.streamUrl,
      genre: draft.genre.trim() ? draft.genre : null,
      loudnessOffsetDb: offset,
      toneCurveId: draft.toneCurveId || null,
    });
    if (!parsed.success) {
      setErrors(zodFieldErrors(parsed.error));
      return;
    }
    setErrors({});
    setBusy(true);
    const outcome = await onSave({ ...parsed.data, directoryId: draft.directoryId });
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
      title={preset ? `Stream preset “${preset.name}”` : `Add a stream preset to ${zone.name}`}
      description={`${zone.name}: ${slotsSentence(zone)}.`}
      wide
      testId="preset-dialog"
    >
      {full ? (
        <p className="mb-3 rounded border border-caution-500/40 bg-caution-50 px-3 py-2 text-sm text-caution-700" role="alert">
          All {zone.presetSlots} preset slots of this zone are used. Remove or move a preset first.
        </p>
      ) : null}
      {!preset ? <StationFinder onChoose={choose} /> : null}
      <form onSubmit={submit} noValidate className="mt-4">
        <FormError message={formError} />
        <div className="grid gap-4 sm:grid-cols-2">
          <div>
            <label htmlFor={`${uid}-name`} className={labelClass}>Name</label>
            <input {...field("name")} className={inputClass} value={draft.name} onChange={(e) => setDraft({ ...draft, name: e.target.value })} />
            <FieldError id={`${uid}-name-error`} messages={errors.name} />
          </div>
          <div>
            <label htmlFor={`${uid}-genre`} className={labelClass}>Genre</label>
            <input {...field("genre")} className={inputClass} value={draft.genre} onChange={(e) => setDraft({ ...draft, genre: e.target.value })} />
            <FieldError id={`${uid}-genre-error`} messages={errors.genre} />
          </div>
          <div className="sm:col-span-2">
            <label htmlFor={`${uid}-streamUrl`} className={labelClass}>Stream URL</label>
            <input
              {...field("streamUrl")}
              className={inputClass}
              type="url"
              inputMode="url"
              placeholder="https://…"
              value={draft.streamUrl}
              onChange={(e) => setDraft({ ...draft, streamUrl: e.target.value, directoryId: null })}
            />
            {draft.directoryId ? <p className="mt-1 text-xs text-slate-500">From the station directory ({draft.directoryId}).</p> : null}
            <FieldError id={`${uid}-streamUrl-error`} messages={errors.streamUrl} />
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
        {caution ? <Caution testId="clip-caution">{caution.message}</Caution> : null}
        <DialogButtons
          onCancel={() => onOpenChange(false)}
          submitLabel={preset ? "Save preset" : "Add preset"}
          busy={busy}
          extra={
            onRemove ? (
              confirmRemove ? (
                <span className="flex items-center gap-2 text-sm">
                  Remove this preset?
                  <button type="button" onClick={remove} className="rounded-md bg-danger-600 px-2 py-1 text-white">Remove</button>
                  <button type="button" onClick={() => setConfirmRemove(false)} className="underline">Keep</button>
                </span>
              ) : (
                <button type="button" onClick={() => setConfirmRemove(true)} className="text-sm text-danger-700 underline">Remove preset…</button>
              )
            ) : null
          }
        />
      </form>
    </DialogShell>
  );
}

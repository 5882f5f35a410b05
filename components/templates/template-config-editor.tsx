"use client";
import { useState } from "react";
import { Caution, FieldError, FormError } from "@/components/board/dialog-shell";
import type { CurveChoiceDto, TemplateDetailDto } from "@/db/queries/templates";
import { sourceKindLabels, sourceKinds, type SourceKind } from "@/lib/devices/model-profiles";
import { sendJson } from "@/lib/fetcher";
import { templateConfigSchema } from "@/lib/validation/templates";
import { outputRoles, type ZoneConfig } from "@/lib/validation/zone-config";
import { buttonClass, dangerButtonClass, errorText, fieldErrorsOf, primaryButtonClass } from "./ui";

type Curve = ZoneConfig["zoneCurve"];
type Errors = Record<string, string[]>;

const cell = "w-full rounded border border-slate-300 px-2 py-1 text-sm aria-[invalid=true]:border-danger-600";
const small = "block text-xs font-medium text-slate-600";
const roleNames: Record<(typeof outputRoles)[number], string> = { main_left: "Main left", main_right: "Main right", subwoofer: "Subwoofer", line_out: "Line out" };

function num(value: string): number {
  return value.trim() === "" ? Number.NaN : Number(value);
}

function move<T>(list: T[], from: number, to: number): T[] {
  if (to < 0 || to >= list.length) return list;
  const next = [...list];
  const [item] = next.splice(from, 1);
  next.splice(to, 0, item);
  return next;
}

let keySeq = 0;
const newKey = (prefix: string) => `${prefix}-new-${Date.now().toString(36)}-${++keySeq}`;

function CurveSelect({ id, value, curves, onChange, label }: { id: string; value: Curve; curves: CurveChoiceDto[]; onChange: (c: Curve) => void; label: string }) {
  const known = value?.id && curves.some((c) => c.id === value.id);
  return (
    <select id={id} aria-label={label} className={cell} value={value?.id ?? ""}
      onChange={(e) => {
        const c = curves.find((x) => x.id === e.target.value);
        onChange(c ? { id: c.id, name: c.name, bands: c.bands } : null);
      }}>
      <option value="">No tone curve</option>
      {value && !known ? <option value={value.id ?? ""}>{value.name} (not in the library)</option> : null}
      {curves.map((c) => <option key={c.id} value={c.id}>{c.name} ({c.bands.length} bands)</option>)}
    </select>
  );
}

/**
 * Edit a template's configuration. Saving makes a new template version; zones
 * made from it then show as behind until they are updated.
 */
export function TemplateConfigEditor({
  template,
  curves,
  onSaved,
  onCancel,
}: {
  template: TemplateDetailDto;
  curves: CurveChoiceDto[];
  onSaved: (t: TemplateDetailDto) => void;
  onCancel: () => void;
}) {
  const [config, setConfig] = useState<ZoneConfig>(() => structuredClone(template.config));
  const [errors, setErrors] = useState<Errors>({});
  const [formError, setFormError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const set = (patch: Partial<ZoneConfig>) => setConfig((c) => ({ ...c, ...patch }));
  const err = (path: string) => errors[path] ?? errors[`config.${path}`];

  async function save(event: React.FormEvent) {
    event.preventDefault();
    const parsed = templateConfigSchema.safeParse(config);
    if (!parsed.success) {
      const out: Errors = {};
      for (const issue of parsed.error.issues) (out[issue.path.join(".") || "_"] ??= []).push(issue.message);
      setErrors(out);
      setFormError("Some fields need attention.");
      return;
    }
    setBusy(true);
    setFormError(null);
    setErrors({});
    try {
      const saved = await sendJson<TemplateDetailDto>(`/api/templates/${template.id}`, "PATCH", { version: template.version, config: parsed.data });
      onSaved(saved);
    } catch (e) {
      setFormError(errorText(e));
      setErrors(fieldErrorsOf(e));
      setBusy(false);
    }
  }

  const updateSource = (i: number, patch: Partial<ZoneConfig["sources"][number]>) =>
    set({ sources: config.sources.map((s, j) => (j === i ? { ...s, ...patch } : s)) });
  const updatePreset = (i: number, patch: Partial<ZoneConfig["presets"][number]>) =>
    set({ presets: config.presets.map((p, j) => (j === i ? { ...p, ...patch } : p)) });
  const outputs = config.outputLayout.outputs;
  const updateOutput = (i: number, patch: Partial<(typeof outputs)[number]>) =>
    set({ outputLayout: { ...config.outputLayout, outputs: outputs.map((o, j) => (j === i ? { ...o, ...patch } : o)) } });
  const boosted = [...config.sources.map((s) => s.loudnessOffsetDb), ...config.presets.map((p) => p.loudnessOffsetDb)].some((v) => v > 6);

  return (
    <form onSubmit={save} noValidate className="space-y-5" data-testid="template-editor" aria-label="Edit the template configuration">
      <FormError message={formError} />

      <fieldset className="rounded-lg border border-slate-200 bg-white p-4">
        <legend className="px-1 font-semibold">Levels and guests</legend>
        <div className="grid gap-3 sm:grid-cols-3">
          <div>
            <label htmlFor="t-ceiling" className={small}>Volume ceiling (%)</label>
            <input id="t-ceiling" type="number" min={0} max={100} className={cell} value={Number.isNaN(config.volumeCeiling) ? "" : config.volumeCeiling}
              onChange={(e) => set({ volumeCeiling: num(e.target.value) })} aria-invalid={Boolean(err("volumeCeiling"))} aria-describedby="t-ceiling-error" />
            <FieldError id="t-ceiling-error" messages={err("volumeCeiling")} />
          </div>
          <div>
            <label htmlFor="t-turnon" className={small}>Turn-on volume (%)</label>
            <input id="t-turnon" type="number" min={0} max={100} className={cell} value={Number.isNaN(config.turnOnVolume) ? "" : config.turnOnVolume}
              onChange={(e) => set({ turnOnVolume: num(e.target.value) })} aria-invalid={Boolean(err("turnOnVolume"))} aria-describedby="t-turnon-error" />
            <FieldError id="t-turnon-error" messages={err("turnOnVolume")} />
          </div>
          <div>
            <label htmlFor="t-zone-curve" className={small}>Zone tone curve</label>
            <CurveSelect id="t-zone-curve" label="Zone tone curve" value={config.zoneCurve} curves={curves} onChange={(c) => set({ zoneCurve: c })} />
            <FieldError id="t-zone-curve-error" messages={err("zoneCurve")} />
          </div>
        </div>
        {config.volumeCeiling >= 85 ? (
          <Caution>A high ceiling lets the zone play loud enough to harm hearing over time (sustained levels above about 85 dBA carry risk) and to damage speakers. Set it for the room and the speakers.</Caution>
        ) : null}
        <div className="mt-3 flex flex-wrap gap-4 text-sm">
          {(["volume", "source", "wake"] as const).map((k) => (
            <label key={k} className="inline-flex items-center gap-2">
              <input type="checkbox" checked={config.guestControls[k]}
                onChange={(e) => set({ guestControls: { ...config.guestControls, [k]: e.target.checked } })} />
              Guests may {{ volume: "change the volume", source: "switch the source", wake: "wake the zone" }[k]}
            </label>
          ))}
        </div>
        <p className="mt-1 text-xs text-slate-500">The guest-control lock is set per zone by support, never by a template.</p>
      </fieldset>

      <fieldset className="rounded-lg border border-slate-200 bg-white p-4">
        <legend className="px-1 font-semibold">Sources</legend>
        <FieldError id="t-sources-error" messages={err("sources")} />
        <ul className="space-y-3">
          {config.sources.map((s, i) => (
            <li key={s.key} className="grid grid-cols-2 gap-2 rounded-md border border-slate-100 p-2 sm:grid-cols-6" data-testid="editor-source">
              <div className="col-span-2">
                <label htmlFor={`s-label-${i}`} className={small}>Name</label>
                <input id={`s-label-${i}`} className={cell} value={s.label} onChange={(e) => updateSource(i, { label: e.target.value })}
                  aria-invalid={Boolean(err(`sources.${i}.label`))} aria-describedby={`s-label-${i}-error`} />
                <FieldError id={`s-label-${i}-error`} messages={err(`sources.${i}.label`)} />
              </div>
              <div>
                <label htmlFor={`s-kind-${i}`} className={small}>Input</label>
                <select id={`s-kind-${i}`} className={cell} value={s.kind} onChange={(e) => updateSource(i, { kind: e.target.value as SourceKind })}>
                  {sourceKinds.map((k) => <option key={k} value={k}>{sourceKindLabels[k]}</option>)}
                </select>
              </div>
              <div>
                <label htmlFor={`s-offset-${i}`} className={small}>Offset (dB)</label>
                <input id={`s-offset-${i}`} type="number" step={0.5} min={-24} max={12} className={cell}
                  value={Number.isNaN(s.loudnessOffsetDb) ? "" : s.loudnessOffsetDb} onChange={(e) => updateSource(i, { loudnessOffsetDb: num(e.target.value) })}
                  aria-invalid={Boolean(err(`sources.${i}.loudnessOffsetDb`))} aria-describedby={`s-offset-${i}-error`} />
                <FieldError id={`s-offset-${i}-error`} messages={err(`sources.${i}.loudnessOffsetDb`)} />
              </div>
              <div className="col-span-2">
                <label htmlFor={`s-curve-${i}`} className={small}>Tone curve</label>
                <CurveSelect id={`s-curve-${i}`} label={`Tone curve of ${s.label}`} value={s.toneCurve} curves={curves} onChange={(c) => updateSource(i, { toneCurve: c })} />
              </div>
              <div className="col-span-2 flex flex-wrap items-center gap-3 text-sm sm:col-span-6">
                <label className="inline-flex items-center gap-1.5">
                  <input type="checkbox" checked={s.enabled} onChange={(e) => updateSource(i, { enabled: e.target.checked })} /> Shown to the household
                </label>
                <label className="inline-flex items-center gap-1.5">
                  <input type="checkbox" checked={s.subsonic} onChange={(e) => updateSource(i, { subsonic: e.target.checked })} /> Subsonic filter
                </label>
                <span className="ml-auto flex gap-1">
                  <button type="button" className={buttonClass} aria-label={`Move ${s.label || "source"} up`} disabled={i === 0}
                    onClick={() => set({ sources: move(config.sources, i, i - 1) })}>↑</button>
                  <button type="button" className={buttonClass} aria-label={`Move ${s.label || "source"} down`} disabled={i === config.sources.length - 1}
                    onClick={() => set({ sources: move(config.sources, i, i + 1) })}>↓</button>
                  <button type="button" className={dangerButtonClass} aria-label={`Remove ${s.label || "source"}`}
                    onClick={() => set({ sources: config.sources.filter((_, j) => j !== i) })}>Remove</button>
                </span>
              </div>
            </li>
          ))}
        </ul>
        <button type="button" className={`${buttonClass} mt-2`}
          onClick={() => set({ sources: [...config.sources, { key: newKey("src"), label: "", kind: "analog", enabled: true, loudnessOffsetDb: 0, subsonic: false, toneCurve: null }] })}>
          Add a source
        </button>
      </fieldset>

      <fieldset className="rounded-lg border border-slate-200 bg-white p-4">
        <legend className="px-1 font-semibold">Favourite stations</legend>
        <FieldError id="t-presets-error" messages={err("presets")} />
        <ol className="space-y-3">
          {config.presets.map((p, i) => (
            <li key={p.key} className="grid grid-cols-2 gap-2 rounded-md border border-slate-100 p-2 sm:grid-cols-6" data-testid="editor-preset">
              <div className="col-span-2">
                <label htmlFor={`p-name-${i}`} className={small}>Station {i + 1}</label>
                <input id={`p-name-${i}`} className={cell} value={p.name} onChange={(e) => updatePreset(i, { name: e.target.value })}
                  aria-invalid={Boolean(err(`presets.${i}.name`))} aria-describedby={`p-name-${i}-error`} />
                <FieldError id={`p-name-${i}-error`} messages={err(`presets.${i}.name`)} />
              </div>
              <div className="col-span-2">
                <label htmlFor={`p-url-${i}`} className={small}>Stream address</label>
                <input id={`p-url-${i}`} type="url" className={cell} value={p.streamUrl} onChange={(e) => updatePreset(i, { streamUrl: e.target.value })}
                  aria-invalid={Boolean(err(`presets.${i}.streamUrl`))} aria-describedby={`p-url-${i}-error`} />
                <FieldError id={`p-url-${i}-error`} messages={err(`presets.${i}.streamUrl`)} />
              </div>
              <div>
                <label htmlFor={`p-genre-${i}`} className={small}>Genre</label>
                <input id={`p-genre-${i}`} className={cell} value={p.genre ?? ""} onChange={(e) => updatePreset(i, { genre: e.target.value || null })} />
              </div>
              <div>
                <label htmlFor={`p-offset-${i}`} className={small}>Offset (dB)</label>
                <input id={`p-offset-${i}`} type="number" step={0.5} min={-24} max={12} className={cell}
                  value={Number.isNaN(p.loudnessOffsetDb) ? "" : p.loudnessOffsetDb} onChange={(e) => updatePreset(i, { loudnessOffsetDb: num(e.target.value) })}
                  aria-invalid={Boolean(err(`presets.${i}.loudnessOffsetDb`))} aria-describedby={`p-offset-${i}-error`} />
                <FieldError id={`p-offset-${i}-error`} messages={err(`presets.${i}.loudnessOffsetDb`)} />
              </div>
              <div className="col-span-2 sm:col-span-3">
                <label htmlFor={`p-curve-${i}`} className={small}>Tone curve</label>
                <CurveSelect id={`p-curve-${i}`} label={`Tone curve of ${p.name}`} value={p.toneCurve} curves={curves} onChange={(c) => updatePreset(i, { toneCurve: c })} />
              </div>
              <span className="col-span-2 flex items-end justify-end gap-1 sm:col-span-3">
                <button type="button" className={buttonClass} aria-label={`Move ${p.name || "station"} up`} disabled={i === 0}
                  onClick={() => set({ presets: move(config.presets, i, i - 1) })}>↑</button>
                <button type="button" className={buttonClass} aria-label={`Move ${p.name || "station"} down`} disabled={i === config.presets.length - 1}
                  onClick={() => set({ presets: move(config.presets, i, i + 1) })}>↓</button>
                <button type="button" className={dangerButtonClass} aria-label={`Remove ${p.name || "station"}`}
                  onClick={() => set({ presets: config.presets.filter((_, j) => j !== i) })}>Remove</button>
              </span>
            </li>
          ))}
        </ol>
        <button type="button" className={`${buttonClass} mt-2`}
          onClick={() => set({ presets: [...config.presets, { key: newKey("preset"), name: "", streamUrl: "https://", genre: null, loudnessOffsetDb: 0, toneCurve: null }] })}>
          Add a station
        </button>
        {boosted ? <Caution>An offset above +6 dB can clip loud material and strain speakers; check the headroom before pushing.</Caution> : null}
      </fieldset>

      <fieldset className="rounded-lg border border-slate-200 bg-white p-4">
        <legend className="px-1 font-semibold">Output layout</legend>
        <div className="grid gap-3 sm:grid-cols-4">
          <div>
            <label htmlFor="x-type" className={small}>Crossover</label>
            <select id="x-type" className={cell} value={config.outputLayout.crossover?.type ?? ""}
              onChange={(e) => set({
                outputLayout: {
                  ...config.outputLayout,
                  crossover: e.target.value
                    ? { type: e.target.value as "butterworth" | "linkwitz_riley", slopeDbPerOctave: config.outputLayout.crossover?.slopeDbPerOctave ?? 24, frequencyHz: config.outputLayout.crossover?.frequencyHz ?? 80 }
                    : null,
                },
              })}>
              <option value="">None</option>
              <option value="linkwitz_riley">Linkwitz-Riley</option>
              <option value="butterworth">Butterworth</option>
            </select>
          </div>
          {config.outputLayout.crossover ? (
            <>
              <div>
                <label htmlFor="x-slope" className={small}>Slope (dB/octave)</label>
                <select id="x-slope" className={cell} value={config.outputLayout.crossover.slopeDbPerOctave}
                  onChange={(e) => set({ outputLayout: { ...config.outputLayout, crossover: { ...config.outputLayout.crossover!, slopeDbPerOctave: Number(e.target.value) as 12 | 24 | 48 } } })}>
                  {[12, 24, 48].map((v) => <option key={v} value={v}>{v}</option>)}
                </select>
              </div>
              <div>
                <label htmlFor="x-freq" className={small}>Frequency (Hz)</label>
                <input id="x-freq" type="number" min={40} max={250} className={cell} value={Number.isNaN(config.outputLayout.crossover.frequencyHz) ? "" : config.outputLayout.crossover.frequencyHz}
                  onChange={(e) => set({ outputLayout: { ...config.outputLayout, crossover: { ...config.outputLayout.crossover!, frequencyHz: num(e.target.value) } } })}
                  aria-invalid={Boolean(err("outputLayout.crossover.frequencyHz"))} aria-describedby="x-freq-error" />
                <FieldError id="x-freq-error" messages={err("outputLayout.crossover.frequencyHz")} />
              </div>
            </>
          ) : null}
        </div>
        <ul className="mt-3 space-y-2">
          {outputs.map((o, i) => (
            <li key={`${o.id}-${i}`} className="grid grid-cols-2 gap-2 rounded-md border border-slate-100 p-2 sm:grid-cols-7">
              <div>
                <label htmlFor={`o-role-${i}`} className={small}>Role</label>
                <select id={`o-role-${i}`} className={cell} value={o.role} onChange={(e) => updateOutput(i, { role: e.target.value as (typeof outputRoles)[number] })}>
                  {outputRoles.map((r) => <option key={r} value={r}>{roleNames[r]}</option>)}
                </select>
              </div>
              <div>
                <label htmlFor={`o-label-${i}`} className={small}>Name</label>
                <input id={`o-label-${i}`} className={cell} value={o.label} onChange={(e) => updateOutput(i, { label: e.target.value })}
                  aria-invalid={Boolean(err(`outputLayout.outputs.${i}.label`))} />
              </div>
              <div>
                <label htmlFor={`o-dist-${i}`} className={small}>Distance</label>
                <input id={`o-dist-${i}`} type="number" min={0} step={0.1} className={cell} value={Number.isNaN(o.distance.value) ? "" : o.distance.value}
                  onChange={(e) => updateOutput(i, { distance: { ...o.distance, value: num(e.target.value) } })} />
              </div>
              <div>
                <label htmlFor={`o-unit-${i}`} className={small}>Unit</label>
                <select id={`o-unit-${i}`} className={cell} value={o.distance.unit} onChange={(e) => updateOutput(i, { distance: { ...o.distance, unit: e.target.value as "m" | "cm" | "in" } })}>
                  <option value="m">m</option><option value="cm">cm</option><option value="in">in</option>
                </select>
              </div>
              <div>
                <label htmlFor={`o-lat-${i}`} className={small}>Latency (ms)</label>
                <input id={`o-lat-${i}`} type="number" min={0} max={100} step={0.1} className={cell} value={Number.isNaN(o.latencyMs) ? "" : o.latencyMs}
                  onChange={(e) => updateOutput(i, { latencyMs: num(e.target.value) })} />
              </div>
              <div>
                <label htmlFor={`o-trim-${i}`} className={small}>Trim (dB)</label>
                <input id={`o-trim-${i}`} type="number" min={-24} max={12} step={0.5} className={cell} value={Number.isNaN(o.trimDb) ? "" : o.trimDb}
                  onChange={(e) => updateOutput(i, { trimDb: num(e.target.value) })} />
              </div>
              <div className="flex items-end">
                <button type="button" className={dangerButtonClass} aria-label={`Remove output ${o.label}`}
                  onClick={() => set({ outputLayout: { ...config.outputLayout, outputs: outputs.filter((_, j) => j !== i) } })}>Remove</button>
              </div>
              <FieldError id={`o-${i}-error`} messages={[...(err(`outputLayout.outputs.${i}.label`) ?? []), ...(err(`outputLayout.outputs.${i}.distance.value`) ?? []), ...(err(`outputLayout.outputs.${i}.latencyMs`) ?? []), ...(err(`outputLayout.outputs.${i}.trimDb`) ?? [])]} />
            </li>
          ))}
        </ul>
        <button type="button" className={`${buttonClass} mt-2`}
          onClick={() => set({ outputLayout: { ...config.outputLayout, outputs: [...outputs, { id: newKey("out"), role: "subwoofer", label: "Subwoofer", distance: { value: 2, unit: "m" }, latencyMs: 0, trimDb: 0, polarityInverted: false }] } })}>
          Add an output
        </button>
        <p className="mt-2 text-xs text-slate-500">Distances are measured per room; zones usually set their own outputs (mark them as set in the zone to keep them on updates).</p>
      </fieldset>

      <div className="flex justify-end gap-2">
        <button type="button" className={buttonClass} onClick={onCancel}>Cancel</button>
        <button type="submit" className={primaryButtonClass} disabled={busy}>{busy ? "Saving…" : `Save as version ${template.version + 1}`}</button>
      </div>
    </form>
  );
}

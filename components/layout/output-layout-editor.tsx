"use client";
import Link from "next/link";
import { useEffect, useMemo, useState } from "react";
import useSWR from "swr";
import type { LayoutDto } from "@/db/queries/layout";
import { outputLayoutResponse } from "@/lib/audio/output-response";
import { logFrequencyGrid } from "@/lib/audio/tone-curve";
import { ApiError, sendJson } from "@/lib/fetcher";
import { CROSSOVER_LIMITS, crossoverSpecOf, layoutDeviceProblems, layoutSchema, layoutUrl, MAX_SUBWOOFERS, roleLabels, type LayoutInput } from "@/lib/validation/layout";
import type { OutputLayout } from "@/lib/validation/zone-config";
import { Caution, ErrorNotice, HEARING_CAUTION, INSTALLATION_CAUTION, RuleOfThumb } from "@/components/curves/cautions";
import { ResponseChart, type ResponseSeries } from "@/components/curves/response-chart";
import { formatDb, formatMs } from "@/components/curves/units";

// The output layout of one zone: which outputs it drives, the crossover
// between mains and subwoofers, distances, latencies, trims and polarity →
// the alignment delays and a plot of the summed response.

type Role = OutputLayout["outputs"][number]["role"];
type Unit = "m" | "cm" | "in";

interface DraftOutput {
  id: string;
  role: Role;
  label: string;
  distance: string;
  unit: Unit;
  latencyMs: string;
  trimDb: string;
  polarityInverted: boolean;
}

interface Draft {
  crossover: { type: "linkwitz_riley" | "butterworth"; slope: "12" | "24" | "48"; frequencyHz: string } | null;
  outputs: DraftOutput[];
}

const GRID = logFrequencyGrid(20, 20_000, 24);
const FREQUENCIES = Array.from(GRID);

function draftOf(layout: OutputLayout): Draft {
  return {
    crossover: layout.crossover
      ? { type: layout.crossover.type, slope: String(layout.crossover.slopeDbPerOctave) as "12" | "24" | "48", frequencyHz: String(layout.crossover.frequencyHz) }
      : null,
    outputs: layout.outputs.map((o) => ({
      id: o.id,
      role: o.role,
      label: o.label,
      distance: String(o.distance.value),
      unit: o.distance.unit,
      latencyMs: String(o.latencyMs),
      trimDb: String(o.trimDb),
      polarityInverted: o.polarityInverted,
    })),
  };
}

const num = (s: string) => (s.trim() === "" ? NaN : Number(s.trim().replace(/\u2212/g, "-").replace(",", ".")));

function candidateOf(d: Draft) {
  return {
    crossover: d.crossover ? { type: d.crossover.type, slopeDbPerOctave: Number(d.crossover.slope), frequencyHz: num(d.crossover.frequencyHz) } : null,
    outputs: d.outputs.map((o) => ({
      id: o.id,
      role: o.role,
      label: o.label,
      distance: { value: num(o.distance), unit: o.unit },
      latencyMs: num(o.latencyMs),
      trimDb: num(o.trimDb),
      polarityInverted: o.polarityInverted,
    })),
  };
}

function uniqueId(d: Draft, base: string) {
  const taken = new Set(d.outputs.map((o) => o.id));
  if (!taken.has(base)) return base;
  for (let n = 2; ; n++) if (!taken.has(`${base}-${n}`)) return `${base}-${n}`;
}

function newOutput(d: Draft, role: Role): DraftOutput {
  const base = { main_left: "main-left", main_right: "main-right", subwoofer: "sub", line_out: "line-out" }[role];
  const label = { main_left: "Left", main_right: "Right", subwoofer: "Subwoofer", line_out: "Line out" }[role];
  return { id: uniqueId(d, base), role, label, distance: "3", unit: "m", latencyMs: role === "subwoofer" ? "5" : "0", trimDb: "0", polarityInverted: false };
}

type Notice = { kind: "ok" | "error" | "stale"; text: string } | null;

export function OutputLayoutEditor({ zoneId }: { zoneId: string }) {
  const { data, error, mutate } = useSWR<LayoutDto, ApiError>(layoutUrl(zoneId));
  const [draft, setDraft] = useState<Draft | null>(data ? draftOf(data.layout) : null);
  const [basedOn, setBasedOn] = useState<number | null>(data?.zone.version ?? null);
  const [touched, setTouched] = useState(false);
  const [notice, setNotice] = useState<Notice>(null);
  const [serverErrors, setServerErrors] = useState<Record<string, string[]>>({});
  const [saving, setSaving] = useState(false);

  useEffect(() => {
    if (!data) return;
    if (draft === null || (!touched && basedOn !== data.zone.version)) {
      setDraft(draftOf(data.layout));
      setBasedOn(data.zone.version);
    }
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [data]);

  const checked = useMemo(() => {
    if (!draft) return null;
    const parsed = layoutSchema.safeParse(candidateOf(draft));
    const errors: Record<string, string> = {};
    if (!parsed.success) for (const issue of parsed.error.issues) errors[issue.path.join(".")] ??= issue.message;
    const layout: LayoutInput | null = parsed.success ? parsed.data : null;
    const device = layout && data ? layoutDeviceProblems(layout, data.profile) : {};
    for (const [k, v] of Object.entries(device)) errors[k] ??= v[0]!;
    return { layout, errors };
  }, [draft, data]);

  const response = useMemo(() => {
    if (!checked?.layout || !data) return null;
    try {
      return outputLayoutResponse({ crossover: crossoverSpecOf(checked.layout), outputs: checked.layout.outputs }, data.zoneCurve?.bands ?? [], { grid: GRID });
    } catch {
      return null;
    }
  }, [checked, data]);

  if (error && !data) return <ErrorNotice testId="layout-error" onRetry={() => mutate()}>The output layout could not be loaded: {error.message}</ErrorNotice>;
  if (!data || !draft || !checked) return <p role="status" className="text-slate-500">Loading…</p>;

  const canEdit = data.may.edit;
  const profile = data.profile;
  const subLimit = profile ? profile.subwooferOutputs : MAX_SUBWOOFERS;
  const count = (role: Role) => draft.outputs.filter((o) => o.role === role).length;
  const dirty = JSON.stringify(candidateOf(draft)) !== JSON.stringify(candidateOf(draftOf(data.layout)));
  const err = (path: string) => checked.errors[path] ?? serverErrors[path]?.[0] ?? serverErrors[`layout.${path}`]?.[0];
  const hasSubs = count("subwoofer") > 0;
  const maxTrim = Math.max(0, ...draft.outputs.map((o) => num(o.trimDb)).filter(Number.isFinite));

  function edit(next: (d: Draft) => Draft) {
    setDraft((d) => d && next(d));
    setTouched(true);
    setNotice(null);
  }
  function updateOutput(i: number, patch: Partial<DraftOutput>) {
    edit((d) => ({ ...d, outputs: d.outputs.map((o, k) => (k === i ? { ...o, ...patch } : o)) }));
  }

  async function save() {
    if (!checked?.layout || Object.keys(checked.errors).length > 0) return;
    setSaving(true);
    setNotice(null);
    setServerErrors({});
    try {
      const result = await sendJson<{ version: number; revision: { number: number; created: boolean } }>(layoutUrl(zoneId), "PUT", { version: basedOn, layout: checked.layout });
      const fresh = await mutate();
      if (fresh) {
        setDraft(draftOf(fresh.layout));
        setBasedOn(fresh.zone.version);
      } else setBasedOn(result.version);
      setTouched(false);
      setNotice({ kind: "ok", text: `Saved${result.revision.created ? ` as revision ${result.revision.number}` : ""}. Push the zone to send it to the device.` });
    } catch (e) {
      if (e instanceof ApiError && e.code === "zone:stale") setNotice({ kind: "stale", text: e.message });
      else {
        if (e instanceof ApiError) setServerErrors(e.fieldErrors ?? {});
        setNotice({ kind: "error", text: e instanceof ApiError ? e.message : "The layout could not be saved." });
      }
    } finally {
      setSaving(false);
    }
  }

  const aligned = response?.alignment.outputs;
  const series: ResponseSeries[] = response
    ? [
        ...(response.mainsDb ? [{ key: "mains", label: hasSubs && draft.crossover ? "Mains (high-pass)" : "Mains", values: response.mainsDb, color: "#0284c7", dashed: true }] : []),
        ...(response.subsDb ? [{ key: "subs", label: draft.crossover ? "Subwoofers (low-pass)" : "Subwoofers", values: response.subsDb, color: "#7c3aed", dashed: true }] : []),
        { key: "unaligned", label: "Sum without delays", values: response.unalignedDb, color: "#d98a04", dashed: true },
        ...(data.zoneCurve ? [{ key: "curve", label: `Zone curve: ${data.zoneCurve.name}`, values: response.toneCurveDb, color: "#64748b", dashed: true }] : []),
        { key: "aligned", label: "Sum with delays", values: response.alignedDb, color: "#0e8572", emphasis: true },
      ]
    : [];

  return (
    <div className="space-y-5">
      <div>
        <nav className="text-sm text-slate-500">
          <Link href="/homes" className="hover:underline">Homes</Link> / <Link href={`/homes/${data.zone.homeId}`} className="hover:underline">{data.zone.homeName}</Link> / {data.zone.name}
        </nav>
        <h1 className="mt-1 text-2xl font-semibold">Output layout · {data.zone.name}</h1>
        <p className="text-sm text-slate-600">
          {profile
            ? `${profile.name}: ${profile.subwooferOutputs === 0 ? "no subwoofer output" : `${profile.subwooferOutputs} subwoofer output${profile.subwooferOutputs === 1 ? "" : "s"}`}, ${profile.hasLineOut ? "a full-range line out" : "no line out"}.`
            : "No device is bound to this zone; its outputs are checked against the device once one is bound."}
        </p>
        <p className="mt-1 text-sm">
          <Link href={`/zones/${zoneId}/level-match`} className="text-accent-700 hover:underline">Level match of this zone</Link>
        </p>
      </div>

      <section aria-labelledby="crossover-heading" className="rounded-lg border border-slate-200 bg-white p-4">
        <h2 id="crossover-heading" className="font-semibold">Crossover</h2>
        <div className="mt-2 flex flex-wrap items-end gap-4">
          <div>
            <label htmlFor="xo-type" className="block text-sm font-medium">Type</label>
            <select
              id="xo-type"
              value={draft.crossover?.type ?? "none"}
              disabled={!canEdit}
              onChange={(e) => {
                const v = e.target.value;
                edit((d) => ({ ...d, crossover: v === "none" ? null : { type: v as "linkwitz_riley" | "butterworth", slope: d.crossover?.slope ?? "24", frequencyHz: d.crossover?.frequencyHz ?? "80" } }));
              }}
              className="mt-1 rounded-md border border-slate-300 px-2 py-1 text-sm"
            >
              <option value="none">None (every output full range)</option>
              <option value="linkwitz_riley">Linkwitz-Riley</option>
              <option value="butterworth">Butterworth</option>
            </select>
          </div>
          {draft.crossover ? (
            <>
              <div>
                <label htmlFor="xo-slope" className="block text-sm font-medium">Slope</label>
                <select
                  id="xo-slope"
                  value={draft.crossover.slope}
                  disabled={!canEdit}
                  onChange={(e) => edit((d) => ({ ...d, crossover: d.crossover && { ...d.crossover, slope: e.target.value as "12" | "24" | "48" } }))}
                  className="mt-1 rounded-md border border-slate-300 px-2 py-1 text-sm"
                >
                  <option value="12">12 dB/octave</option>
                  <option value="24">24 dB/octave</option>
                  <option value="48">48 dB/octave</option>
                </select>
              </div>
              <div>
                <label htmlFor="xo-frequency" className="block text-sm font-medium">Frequency (Hz)</label>
                <input
                  id="xo-frequency"
                  type="number"
                  min={CROSSOVER_LIMITS.minHz}
                  max={CROSSOVER_LIMITS.maxHz}
                  step="1"
                  value={draft.crossover.frequencyHz}
                  disabled={!canEdit}
                  onChange={(e) => edit((d) => ({ ...d, crossover: d.crossover && { ...d.crossover, frequencyHz: e.target.value } }))}
                  aria-invalid={err("crossover.frequencyHz") ? true : undefined}
                  className="mt-1 w-24 rounded-md border border-slate-300 px-2 py-1 text-sm tabular-nums"
                />
              </div>
            </>
          ) : null}
        </div>
        {err("crossover.frequencyHz") ? <p className="mt-1 text-sm text-danger-700">{err("crossover.frequencyHz")}</p> : null}
        {draft.crossover && !hasSubs ? <p className="mt-2 text-sm text-slate-500">No subwoofer yet: the crossover takes effect once one is added.</p> : null}
        {!draft.crossover && hasSubs ? <p className="mt-2 text-sm text-caution-700">Without a crossover the subwoofers get the full range and the mains get the deep bass too.</p> : null}
        <div className="mt-3 space-y-1">
          <RuleOfThumb>A single subwoofer is usually crossed over around 80 Hz, because bass below roughly 100 Hz is hard to localise; a left/right pair of subwoofers allows a higher crossover.</RuleOfThumb>
          <RuleOfThumb>Powered subwoofers with their own DSP often add a few milliseconds of latency; enter it so the delays account for it.</RuleOfThumb>
        </div>
      </section>

      <section aria-labelledby="outputs-heading" className="rounded-lg border border-slate-200 bg-white">
        <div className="flex flex-wrap items-center justify-between gap-2 border-b border-slate-200 p-3">
          <h2 id="outputs-heading" className="font-semibold">Outputs</h2>
          {canEdit ? (
            <div className="flex flex-wrap gap-2">
              {count("main_left") === 0 || count("main_right") === 0 ? (
                <button
                  type="button"
                  onClick={() =>
                    edit((d) => {
                      let next = d;
                      for (const role of ["main_left", "main_right"] as const) {
                        if (!next.outputs.some((o) => o.role === role)) next = { ...next, outputs: [...next.outputs, newOutput(next, role)] };
                      }
                      return next;
                    })
                  }
                  className="rounded-md px-3 py-1 text-sm ring-1 ring-slate-300 hover:bg-slate-50"
                >
                  Add main pair
                </button>
              ) : null}
              <button
                type="button"
                onClick={() => edit((d) => ({ ...d, outputs: [...d.outputs, newOutput(d, "subwoofer")] }))}
                disabled={count("subwoofer") >= Math.min(subLimit, MAX_SUBWOOFERS)}
                title={count("subwoofer") >= subLimit ? (subLimit === 0 ? "The device has no subwoofer output." : `The device has ${subLimit} subwoofer output${subLimit === 1 ? "" : "s"}.`) : undefined}
                className="rounded-md px-3 py-1 text-sm ring-1 ring-slate-300 hover:bg-slate-50 disabled:opacity-40"
              >
                Add subwoofer
              </button>
              <button
                type="button"
                onClick={() => edit((d) => ({ ...d, outputs: [...d.outputs, newOutput(d, "line_out")] }))}
                disabled={count("line_out") > 0 || profile?.hasLineOut === false}
                title={profile?.hasLineOut === false ? "The device has no line out." : undefined}
                className="rounded-md px-3 py-1 text-sm ring-1 ring-slate-300 hover:bg-slate-50 disabled:opacity-40"
              >
                Add line out
              </button>
            </div>
          ) : null}
        </div>
        {draft.outputs.length === 0 ? (
          <p className="p-6 text-center text-sm text-slate-500">No outputs yet.{canEdit ? " Add the main pair to start." : ""}</p>
        ) : (
          <div className="overflow-x-auto">
            <table className="w-full text-left text-sm" data-testid="outputs-table">
              <thead className="bg-slate-50 text-xs uppercase tracking-wide text-slate-500">
                <tr>
                  <th scope="col" className="px-3 py-2">Output</th>
                  <th scope="col" className="px-3 py-2">Name</th>
                  <th scope="col" className="px-3 py-2">Distance to listener</th>
                  <th scope="col" className="px-3 py-2">Own latency (ms)</th>
                  <th scope="col" className="px-3 py-2">Trim (dB)</th>
                  <th scope="col" className="px-3 py-2">Polarity</th>
                  <th scope="col" className="px-3 py-2"><span className="sr-only">Actions</span></th>
                </tr>
              </thead>
              <tbody className="divide-y divide-slate-100">
                {draft.outputs.map((o, i) => {
                  const at = (f: string) => err(`outputs.${i}.${f}`);
                  const cellError = (f: string) => (at(f) ? <p className="mt-0.5 text-xs text-danger-700">{at(f)}</p> : null);
                  return (
                    <tr key={`${o.id}-${i}`} data-testid="output-row">
                      <td className="px-3 py-2 align-top">
                        <label htmlFor={`out-${i}-role`} className="sr-only">{`Output ${i + 1} role`}</label>
                        <select id={`out-${i}-role`} value={o.role} disabled={!canEdit} onChange={(e) => updateOutput(i, { role: e.target.value as Role })} className="rounded-md border border-slate-300 px-2 py-1">
                          {(Object.keys(roleLabels) as Role[]).map((r) => (
                            <option key={r} value={r}>{roleLabels[r]}</option>
                          ))}
                        </select>
                        {cellError("role")}
                      </td>
                      <td className="px-3 py-2 align-top">
                        <label htmlFor={`out-${i}-label`} className="sr-only">{`Output ${i + 1} name`}</label>
                        <input id={`out-${i}-label`} value={o.label} disabled={!canEdit} onChange={(e) => updateOutput(i, { label: e.target.value })} className="w-32 rounded-md border border-slate-300 px-2 py-1" />
                        {cellError("label")}
                      </td>
                      <td className="px-3 py-2 align-top">
                        <div className="flex gap-1">
                          <label htmlFor={`out-${i}-distance`} className="sr-only">{`Output ${i + 1} distance`}</label>
                          <input id={`out-${i}-distance`} type="number" min={0} step="any" value={o.distance} disabled={!canEdit} onChange={(e) => updateOutput(i, { distance: e.target.value })} className="w-20 rounded-md border border-slate-300 px-2 py-1 tabular-nums" />
                          <label htmlFor={`out-${i}-unit`} className="sr-only">{`Output ${i + 1} distance unit`}</label>
                          <select id={`out-${i}-unit`} value={o.unit} disabled={!canEdit} onChange={(e) => updateOutput(i, { unit: e.target.value as Unit })} className="rounded-md border border-slate-300 px-1 py-1">
                            <option value="m">m</option>
                            <option value="cm">cm</option>
                            <option value="in">in</option>
                          </select>
                        </div>
                        {cellError("distance.value")}
                      </td>
                      <td className="px-3 py-2 align-top">
                        <label htmlFor={`out-${i}-latency`} className="sr-only">{`Output ${i + 1} latency (ms)`}</label>
                        <input id={`out-${i}-latency`} type="number" min={0} max={100} step="0.1" value={o.latencyMs} disabled={!canEdit} onChange={(e) => updateOutput(i, { latencyMs: e.target.value })} className="w-20 rounded-md border border-slate-300 px-2 py-1 tabular-nums" />
                        {cellError("latencyMs")}
                      </td>
                      <td className="px-3 py-2 align-top">
                        <label htmlFor={`out-${i}-trim`} className="sr-only">{`Output ${i + 1} trim (dB)`}</label>
                        <input id={`out-${i}-trim`} type="number" min={-24} max={12} step="0.5" value={o.trimDb} disabled={!canEdit} onChange={(e) => updateOutput(i, { trimDb: e.target.value })} className="w-20 rounded-md border border-slate-300 px-2 py-1 tabular-nums" />
                        {cellError("trimDb")}
                      </td>
                      <td className="px-3 py-2 align-top">
                        <label className="flex items-center gap-1 whitespace-nowrap">
                          <input type="checkbox" checked={o.polarityInverted} disabled={!canEdit} onChange={(e) => updateOutput(i, { polarityInverted: e.target.checked })} aria-label={`Output ${i + 1} polarity inverted`} />
                          inverted
                        </label>
                      </td>
                      <td className="px-3 py-2 align-top">
                        {canEdit ? (
                          <button type="button" onClick={() => edit((d) => ({ ...d, outputs: d.outputs.filter((_, k) => k !== i) }))} aria-label={`Remove output ${i + 1}`} className="rounded px-2 py-1 text-danger-700 ring-1 ring-danger-600/40">
                            Remove
                          </button>
                        ) : null}
                      </td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </div>
        )}
        {err("outputs") ? <p className="px-3 py-2 text-sm text-danger-700">{err("outputs")}</p> : null}
      </section>

      <section aria-labelledby="alignment-heading" className="rounded-lg border border-slate-200 bg-white p-4">
        <h2 id="alignment-heading" className="font-semibold">Alignment</h2>
        <p className="text-sm text-slate-600">
          Sound travels at 343 m/s (dry air, 20 °C): about 2.92 ms per metre. Each output is delayed so that everything arrives with the latest one, which gets no delay; an output's own latency counts as if it were farther away.
        </p>
        {aligned && aligned.length > 0 ? (
          <table className="mt-3 w-full text-left text-sm" data-testid="alignment-table">
            <thead className="text-xs uppercase tracking-wide text-slate-500">
              <tr>
                <th scope="col" className="py-1 pr-3">Output</th>
                <th scope="col" className="py-1 pr-3 text-right">Distance</th>
                <th scope="col" className="py-1 pr-3 text-right">Arrives after</th>
                <th scope="col" className="py-1 pr-3 text-right">Delay to set</th>
                <th scope="col" className="py-1 text-right">Trim</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-slate-100">
              {aligned.map((a) => {
                const o = checked.layout!.outputs.find((x) => x.id === a.id)!;
                return (
                  <tr key={a.id} data-testid="alignment-row">
                    <td className="py-1 pr-3">{o.label} <span className="text-xs text-slate-500">({roleLabels[o.role]})</span></td>
                    <td className="py-1 pr-3 text-right tabular-nums">{a.distanceM.toFixed(2)} m</td>
                    <td className="py-1 pr-3 text-right tabular-nums">{formatMs(a.arrivalMs)}</td>
                    <td className="py-1 pr-3 text-right font-medium tabular-nums" data-testid="delay">{formatMs(a.delayMs)}</td>
                    <td className="py-1 text-right tabular-nums">{formatDb(a.trimDb)}</td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        ) : (
          <p className="mt-2 text-sm text-slate-500">{Object.keys(checked.errors).length ? "Fix the marked fields to see the delays." : "Add outputs to see their delays."}</p>
        )}
      </section>

      <section aria-labelledby="sum-heading" className="rounded-lg border border-slate-200 bg-white p-4">
        <h2 id="sum-heading" className="font-semibold">Summed response at the listening position</h2>
        {response && draft.outputs.some((o) => o.role !== "line_out") ? (
          <>
            <ResponseChart frequencies={FREQUENCIES} series={series} label="Summed response of the outputs with and without delays, 20 Hz to 20 kHz" testId="layout-chart" />
            <p className="mt-1 text-xs text-slate-500">
              Crossover branches with each output's trim, polarity and arrival time as phase, summed, then shaped by the zone's tone curve{data.zoneCurve ? ` (“${data.zoneCurve.name}”)` : " (none attached)"}. The main pair and the subwoofers each count as one branch; the line out feeds other equipment and is not part of the sum; the room is not modelled.
            </p>
          </>
        ) : (
          <p className="mt-2 text-sm text-slate-500">{Object.keys(checked.errors).length ? "Fix the marked fields to see the plot." : "Add the main pair or a subwoofer to see the plot."}</p>
        )}
      </section>

      {notice ? (
        notice.kind === "ok" ? (
          <p role="status" data-testid="layout-saved" className="rounded-md bg-accent-50 px-3 py-2 text-sm text-accent-700">{notice.text}</p>
        ) : (
          <ErrorNotice testId="layout-save-error">
            {notice.text}
            {notice.kind === "stale" ? (
              <button
                type="button"
                className="ml-2 underline"
                onClick={async () => {
                  const fresh = await mutate();
                  if (fresh) {
                    setDraft(draftOf(fresh.layout));
                    setBasedOn(fresh.zone.version);
                    setTouched(false);
                  }
                  setNotice(null);
                }}
              >
                Reload (discards your edits)
              </button>
            ) : null}
          </ErrorNotice>
        )
      ) : null}

      {canEdit ? (
        <div className="flex flex-wrap items-center gap-3">
          <button
            type="button"
            onClick={save}
            disabled={!dirty || saving || Object.keys(checked.errors).length > 0}
            className="rounded-md bg-accent-600 px-4 py-1.5 text-sm font-medium text-white hover:bg-accent-700 disabled:opacity-40"
          >
            {saving ? "Saving…" : "Save layout"}
          </button>
          <button
            type="button"
            onClick={() => {
              setDraft(draftOf(data.layout));
              setTouched(false);
              setServerErrors({});
              setNotice(null);
            }}
            disabled={!dirty || saving}
            className="rounded-md px-3 py-1.5 text-sm ring-1 ring-slate-300 disabled:opacity-40"
          >
            Revert changes
          </button>
          {Object.keys(checked.errors).length ? <p className="text-sm text-danger-700">Fix the marked fields to save.</p> : null}
        </div>
      ) : (
        <p className="text-sm text-slate-500">Your role can view this layout but not change it.</p>
      )}

      <div className="space-y-2">
        {hasSubs || maxTrim > 0 ? (
          <Caution title="Subwoofer and boost levels" testId="layout-caution">
            Trims above 0 dB{hasSubs ? " and subwoofer levels" : ""} raise the bass the room receives; set them by measuring at the listening position, not by ear at high volume. {HEARING_CAUTION}
          </Caution>
        ) : null}
        <Caution title="Installation" testId="installation-caution">
          {INSTALLATION_CAUTION} Check speaker and subwoofer ratings before raising levels.
        </Caution>
      </div>
    </div>
  );
}

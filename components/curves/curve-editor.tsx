"use client";
import Link from "next/link";
import { useRouter } from "next/navigation";
import { useEffect, useMemo, useState } from "react";
import useSWR from "swr";
import type { CurveDetailDto, CurveWriteResult } from "@/db/queries/curves";
import { curveResponse, largestBoostDb, logFrequencyGrid } from "@/lib/audio/tone-curve";
import { ApiError, sendJson } from "@/lib/fetcher";
import { curveUrl } from "@/lib/validation/curves";
import { TONE_BAND_TYPES, TONE_LIMITS } from "@/lib/validation/tone-curve";
import { bandTypeLabels, defaultBand, gainApplies, parseDraft, qApplies, toDraft, type BandField, type DraftBand } from "./band-draft";
import { Caution, ErrorNotice, HEARING_CAUTION, LARGE_BOOST_DB } from "./cautions";
import { CurveActions } from "./curve-actions";
import { ResponseChart, type ResponseSeries } from "./response-chart";
import { formatDb, formatHz } from "./units";

const GRID = logFrequencyGrid(20, 20_000, 24);
const FREQUENCIES = Array.from(GRID);
const BAND_COLORS = ["#64748b", "#7c3aed", "#0284c7", "#db2777", "#65a30d", "#ea580c", "#0891b2", "#a16207", "#4f46e5", "#be123c"];

interface Draft {
  name: string;
  description: string;
  bands: DraftBand[];
}

function draftOf(curve: CurveDetailDto): Draft {
  return { name: curve.name, description: curve.description, bands: curve.bands.map(toDraft) };
}

function sameAsSaved(draft: Draft, curve: CurveDetailDto) {
  if (draft.name !== curve.name || draft.description !== curve.description || draft.bands.length !== curve.bands.length) return false;
  return draft.bands.every((d, i) => {
    const p = parseDraft(d).band;
    const b = curve.bands[i]!;
    return p !== null && p.type === b.type && p.frequencyHz === b.frequencyHz && p.gainDb === b.gainDb && p.q === b.q && p.enabled === b.enabled;
  });
}

type Notice = { kind: "saved"; text: string } | { kind: "stale"; text: string } | { kind: "error"; text: string } | null;

export function CurveEditor({ curveId }: { curveId: string }) {
  const router = useRouter();
  const { data: curve, error, mutate } = useSWR<CurveDetailDto, ApiError>(curveUrl(curveId));
  const [draft, setDraft] = useState<Draft | null>(curve ? draftOf(curve) : null);
  const [basedOn, setBasedOn] = useState<number | null>(curve?.version ?? null);
  const [saving, setSaving] = useState(false);
  const [notice, setNotice] = useState<Notice>(null);
  const [serverErrors, setServerErrors] = useState<Record<string, string[]>>({});
  const [touched, setTouched] = useState(false);

  // A fresh read (first load, or a revalidation) replaces the draft only while nothing was typed.
  useEffect(() => {
    if (!curve) return;
    if (draft === null || (!touched && basedOn !== curve.version)) {
      setDraft(draftOf(curve));
      setBasedOn(curve.version);
    }
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [curve]);

  function edit(next: (d: Draft) => Draft) {
    setDraft((d) => d && next(d));
    setTouched(true);
    setNotice(null);
  }

  const parsed = useMemo(() => (draft ? draft.bands.map(parseDraft) : []), [draft]);
  const validBands = parsed.flatMap((p) => (p.band ? [p.band] : []));
  const allValid = parsed.every((p) => p.band !== null);
  const response = useMemo(() => curveResponse(validBands, 48_000, GRID), [JSON.stringify(validBands)]); // eslint-disable-line react-hooks/exhaustive-deps
  const boost = useMemo(() => largestBoostDb(validBands), [JSON.stringify(validBands)]); // eslint-disable-line react-hooks/exhaustive-deps
  const boostAt = useMemo(() => {
    // Where the largest boost sits: the plot grid plus each band's own frequency.
    const candidates = [...FREQUENCIES, ...validBands.map((b) => b.frequencyHz).filter((f) => f >= 20 && f <= 20_000)];
    const values = curveResponse(validBands, 48_000, candidates);
    let best = -Infinity;
    let at = 0;
    values.forEach((v, i) => {
      if (v > best + 1e-9) {
        best = v;
        at = candidates[i]!;
      }
    });
    return at;
  }, [JSON.stringify(validBands)]); // eslint-disable-line react-hooks/exhaustive-deps

  if (error && !curve) return <ErrorNotice testId="curve-error" onRetry={() => mutate()}>The tone curve could not be loaded: {error.message}</ErrorNotice>;
  if (!curve || !draft) return <p role="status" className="text-slate-500">Loading the tone curve…</p>;

  const canEdit = curve.may.edit;
  const dirty = !sameAsSaved(draft, curve);
  const tooMany = draft.bands.length > curve.maxBands;
  const nameError = draft.name.trim().length < 2 ? "Give the curve a name of at least 2 characters." : draft.name.trim().length > 80 ? "Keep the name to 80 characters." : null;
  const zonesUsing = new Set(curve.attachments.map((a) => a.zoneId)).size;

  const series: ResponseSeries[] = [
    ...parsed.flatMap((p, i) =>
      p.band && p.band.enabled
        ? [
            {
              key: `b${i}`,
              label: `Band ${i + 1}: ${bandTypeLabels[p.band.type]} ${formatHz(p.band.frequencyHz)}`,
              values: curveResponse([p.band], 48_000, GRID),
              color: BAND_COLORS[i % BAND_COLORS.length]!,
              dashed: true,
            },
          ]
        : [],
    ),
    { key: "combined", label: "Combined", values: response, color: "#0e8572", emphasis: true },
  ];

  function update(index: number, patch: Partial<DraftBand>) {
    edit((d) => ({ ...d, bands: d.bands.map((b, i) => (i === index ? { ...b, ...patch } : b)) }));
  }

  function move(index: number, by: -1 | 1) {
    edit((d) => {
      const bands = [...d.bands];
      const [b] = bands.splice(index, 1);
      bands.splice(index + by, 0, b!);
      return { ...d, bands };
    });
  }

  async function save() {
    if (!draft || !allValid || tooMany || nameError) return;
    setSaving(true);
    setNotice(null);
    setServerErrors({});
    try {
      const result = await sendJson<CurveWriteResult>(curveUrl(curveId), "PATCH", {
        version: basedOn,
        name: draft.name.trim(),
        description: draft.description.trim(),
        bands: validBands,
      });
      await mutate(result.curve, { revalidate: false });
      setDraft(draftOf(result.curve));
      setBasedOn(result.curve.version);
      setTouched(false);
      const zones = result.zones;
      setNotice({
        kind: "saved",
        text: zones.length
          ? `Saved. ${zones.length} zone${zones.length === 1 ? "" : "s"} got a new revision: ${zones.map((z) => `${z.zoneName} (revision ${z.revisionNumber})`).join(", ")}. Push them to send the change to the devices.`
          : "Saved.",
      });
    } catch (e) {
      if (e instanceof ApiError && e.code === "curve:stale") {
        setNotice({ kind: "stale", text: e.message });
      } else if (e instanceof ApiError) {
        setServerErrors(e.fieldErrors ?? {});
        setNotice({ kind: "error", text: e.message });
      } else {
        setNotice({ kind: "error", text: "The curve could not be saved. Check the connection and try again." });
      }
    } finally {
      setSaving(false);
    }
  }

  async function reloadDiscarding() {
    const fresh = await mutate();
    if (fresh) {
      setDraft(draftOf(fresh));
      setBasedOn(fresh.version);
      setTouched(false);
    }
    setNotice(null);
  }

  const fieldId = (i: number, f: BandField | "enabled") => `band-${i}-${f}`;
  const serverBandError = (i: number, f: string) => serverErrors[`bands.${i}.${f}`]?.[0];

  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-start justify-between gap-3">
        <div>
          <nav className="text-sm text-slate-500">
            <Link href="/library/curves" className="hover:underline">Tone curves</Link> / {curve.name}
          </nav>
          <h1 className="mt-1 text-2xl font-semibold">{curve.name}</h1>
          <p className="text-sm text-slate-600">
            Version {curve.version} · {curve.bands.length} band{curve.bands.length === 1 ? "" : "s"} saved · attached {curve.attachedCount}×
          </p>
        </div>
        <CurveActions curve={curve} onDeleted={() => router.push("/library/curves")} onDuplicated={(id) => router.push(`/library/curves/${id}`)} />
      </div>

      <section aria-labelledby="details-heading" className="grid gap-3 sm:grid-cols-2">
        <h2 id="details-heading" className="sr-only">Name and description</h2>
        <div>
          <label htmlFor="curve-name" className="block text-sm font-medium">Name</label>
          <input
            id="curve-name"
            value={draft.name}
            disabled={!canEdit}
            onChange={(e) => edit((d) => ({ ...d, name: e.target.value }))}
            aria-invalid={nameError ? true : undefined}
            aria-describedby={nameError ? "curve-name-error" : undefined}
            className="mt-1 w-full rounded-md border border-slate-300 px-3 py-1.5 text-sm disabled:bg-slate-50"
          />
          {nameError ? <p id="curve-name-error" className="mt-1 text-xs text-danger-700">{nameError}</p> : null}
        </div>
        <div>
          <label htmlFor="curve-description" className="block text-sm font-medium">Description</label>
          <input
            id="curve-description"
            value={draft.description}
            disabled={!canEdit}
            maxLength={500}
            onChange={(e) => edit((d) => ({ ...d, description: e.target.value }))}
            className="mt-1 w-full rounded-md border border-slate-300 px-3 py-1.5 text-sm disabled:bg-slate-50"
          />
        </div>
      </section>

      <section aria-labelledby="plot-heading" className="rounded-lg border border-slate-200 bg-white p-4">
        <div className="flex flex-wrap items-baseline justify-between gap-2">
          <h2 id="plot-heading" className="font-semibold">Response</h2>
          <p className="text-sm text-slate-600" data-testid="largest-boost" aria-live="polite">
            Largest boost: <strong>{formatDb(boost)}</strong>
            {boost > 0.05 ? ` near ${formatHz(Math.round(boostAt))}` : ""} · the headroom this curve needs
          </p>
        </div>
        <ResponseChart frequencies={FREQUENCIES} series={series} label={`Magnitude response of ${draft.name || "this curve"}, each band and combined, 20 Hz to 20 kHz`} />
        <p className="mt-1 text-xs text-slate-500">
          Magnitude at 48 kHz from the Web Audio biquad formulas; dashed lines are single bands, the solid line is the combined curve. Disabled bands are left out.
        </p>
        {boost > LARGE_BOOST_DB ? (
          <div className="mt-3">
            <Caution title={`Large boost: ${formatDb(boost)}`} testId="boost-caution">
              Boosts above {LARGE_BOOST_DB} dB (common practice, no single source) take that much headroom from every source it is used with: lower the loudness offset or the volume
              ceiling to match, or cut elsewhere instead of boosting. {HEARING_CAUTION}
            </Caution>
          </div>
        ) : null}
      </section>

      <section aria-labelledby="bands-heading" className="rounded-lg border border-slate-200 bg-white">
        <div className="flex flex-wrap items-center justify-between gap-2 border-b border-slate-200 p-3">
          <h2 id="bands-heading" className="font-semibold">
            Bands <span className="font-normal text-slate-500">({draft.bands.length} of at most {curve.maxBands})</span>
          </h2>
          {canEdit ? (
            <button
              type="button"
              onClick={() => edit((d) => ({ ...d, bands: [...d.bands, defaultBand()] }))}
              disabled={draft.bands.length >= curve.maxBands}
              className="rounded-md bg-white px-3 py-1.5 text-sm font-medium ring-1 ring-slate-300 hover:bg-slate-50 disabled:opacity-40"
            >
              Add band
            </button>
          ) : null}
        </div>
        {tooMany ? <p className="px-3 pt-2 text-sm text-danger-700" role="alert">A tone curve has at most {curve.maxBands} bands; remove {draft.bands.length - curve.maxBands}.</p> : null}
        {draft.bands.length === 0 ? (
          <p className="p-6 text-center text-sm text-slate-500">No bands: the curve is flat (0 dB everywhere).{canEdit ? " Add a band to shape it." : ""}</p>
        ) : (
          <div className="overflow-x-auto">
            <table className="w-full text-left text-sm" data-testid="band-table">
              <thead className="bg-slate-50 text-xs uppercase tracking-wide text-slate-500">
                <tr>
                  <th scope="col" className="px-3 py-2">#</th>
                  <th scope="col" className="px-3 py-2">Type</th>
                  <th scope="col" className="px-3 py-2">Frequency (Hz)</th>
                  <th scope="col" className="px-3 py-2">Gain (dB)</th>
                  <th scope="col" className="px-3 py-2">Q</th>
                  <th scope="col" className="px-3 py-2">On</th>
                  <th scope="col" className="px-3 py-2"><span className="sr-only">Actions</span></th>
                </tr>
              </thead>
              <tbody className="divide-y divide-slate-100">
                {draft.bands.map((b, i) => {
                  const p = parsed[i]!;
                  const err = (f: BandField) => p.errors[f] ?? serverBandError(i, f);
                  const numberCell = (f: "frequencyHz" | "gainDb" | "q", label: string, applies: boolean, step: string, min: number, max: number) => (
                    <td className="px-3 py-2 align-top">
                      <label htmlFor={fieldId(i, f)} className="sr-only">{`Band ${i + 1} ${label}`}</label>
                      <input
                        id={fieldId(i, f)}
                        inputMode="decimal"
                        type="number"
                        step={step}
                        min={min}
                        max={max}
                        value={b[f]}
                        disabled={!canEdit}
                        onChange={(e) => update(i, { [f]: e.target.value } as Partial<DraftBand>)}
                        aria-invalid={err(f) ? true : undefined}
                        aria-describedby={err(f) ? `${fieldId(i, f)}-error` : undefined}
                        className={`w-24 rounded-md border px-2 py-1 tabular-nums disabled:bg-slate-50 ${err(f) ? "border-danger-600" : "border-slate-300"} ${applies ? "" : "text-slate-400"}`}
                      />
                      {!applies ? <p className="mt-0.5 text-xs text-slate-400">not used by this type</p> : null}
                      {err(f) ? <p id={`${fieldId(i, f)}-error`} className="mt-0.5 text-xs text-danger-700">{err(f)}</p> : null}
                    </td>
                  );
                  return (
                    <tr key={b.key} data-testid="band-row" className={b.enabled ? "" : "bg-slate-50 text-slate-500"}>
                      <td className="px-3 py-2 align-top tabular-nums">{i + 1}</td>
                      <td className="px-3 py-2 align-top">
                        <label htmlFor={fieldId(i, "type")} className="sr-only">{`Band ${i + 1} type`}</label>
                        <select
                          id={fieldId(i, "type")}
                          value={b.type}
                          disabled={!canEdit}
                          onChange={(e) => update(i, { type: e.target.value as DraftBand["type"] })}
                          className="rounded-md border border-slate-300 px-2 py-1 disabled:bg-slate-50"
                        >
                          {TONE_BAND_TYPES.map((t) => (
                            <option key={t} value={t}>{bandTypeLabels[t]}</option>
                          ))}
                        </select>
                      </td>
                      {numberCell("frequencyHz", "frequency (Hz)", true, "any", TONE_LIMITS.minFrequencyHz, TONE_LIMITS.maxFrequencyHz)}
                      {numberCell("gainDb", "gain (dB)", gainApplies(b.type), "0.5", TONE_LIMITS.minGainDb, TONE_LIMITS.maxGainDb)}
                      {numberCell("q", "Q", qApplies(b.type), "0.1", TONE_LIMITS.minQ, TONE_LIMITS.maxQ)}
                      <td className="px-3 py-2 align-top">
                        <input
                          id={fieldId(i, "enabled")}
                          type="checkbox"
                          checked={b.enabled}
                          disabled={!canEdit}
                          onChange={(e) => update(i, { enabled: e.target.checked })}
                          aria-label={`Band ${i + 1} on`}
                          className="h-4 w-4"
                        />
                      </td>
                      <td className="px-3 py-2 align-top">
                        {canEdit ? (
                          <div className="flex gap-1">
                            <button type="button" onClick={() => move(i, -1)} disabled={i === 0} aria-label={`Move band ${i + 1} up`} className="rounded px-2 py-1 ring-1 ring-slate-300 disabled:opacity-30">↑</button>
                            <button type="button" onClick={() => move(i, 1)} disabled={i === draft.bands.length - 1} aria-label={`Move band ${i + 1} down`} className="rounded px-2 py-1 ring-1 ring-slate-300 disabled:opacity-30">↓</button>
                            <button
                              type="button"
                              onClick={() => edit((d) => ({ ...d, bands: d.bands.filter((_, k) => k !== i) }))}
                              aria-label={`Remove band ${i + 1}`}
                              className="rounded px-2 py-1 text-danger-700 ring-1 ring-danger-600/40"
                            >
                              Remove
                            </button>
                          </div>
                        ) : null}
                      </td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </div>
        )}
        <p className="border-t border-slate-100 px-3 py-2 text-xs text-slate-500">
          Frequency {TONE_LIMITS.minFrequencyHz} Hz–{TONE_LIMITS.maxFrequencyHz / 1000} kHz · gain {TONE_LIMITS.minGainDb} to +{TONE_LIMITS.maxGainDb} dB · Q {TONE_LIMITS.minQ}–{TONE_LIMITS.maxQ} (linear, for every type; shelves use a fixed slope).
        </p>
      </section>

      {notice?.kind === "saved" ? (
        <p role="status" data-testid="curve-saved" className="rounded-md bg-accent-50 px-3 py-2 text-sm text-accent-700">{notice.text}</p>
      ) : null}
      {notice?.kind === "stale" ? (
        <ErrorNotice testId="curve-stale">
          {notice.text}{" "}
          <button type="button" onClick={reloadDiscarding} className="ml-2 underline">Reload (discards your edits)</button>
        </ErrorNotice>
      ) : null}
      {notice?.kind === "error" ? <ErrorNotice testId="curve-save-error">{notice.text}</ErrorNotice> : null}

      {canEdit ? (
        <div className="sticky bottom-0 flex flex-wrap items-center gap-3 border-t border-slate-200 bg-white/95 py-3">
          <button
            type="button"
            onClick={save}
            disabled={!dirty || !allValid || tooMany || nameError !== null || saving}
            className="rounded-md bg-accent-600 px-4 py-1.5 text-sm font-medium text-white hover:bg-accent-700 disabled:opacity-40"
          >
            {saving ? "Saving…" : "Save curve"}
          </button>
          <button
            type="button"
            onClick={() => {
              setDraft(draftOf(curve));
              setBasedOn(curve.version);
              setTouched(false);
              setServerErrors({});
              setNotice(null);
            }}
            disabled={!dirty || saving}
            className="rounded-md px-3 py-1.5 text-sm ring-1 ring-slate-300 disabled:opacity-40"
          >
            Revert changes
          </button>
          {dirty && zonesUsing > 0 ? (
            <p className="text-sm text-caution-700" data-testid="attached-save-note">
              Saving changes the desired configuration of {zonesUsing} zone{zonesUsing === 1 ? "" : "s"}; each gets a new revision.
            </p>
          ) : null}
          {!allValid ? <p className="text-sm text-danger-700">Fix the marked fields to save.</p> : null}
        </div>
      ) : (
        <p className="text-sm text-slate-500">Your role can view this curve but not change it.</p>
      )}

      <section aria-labelledby="attached-heading" className="rounded-lg border border-slate-200 bg-white">
        <h2 id="attached-heading" className="border-b border-slate-200 p-3 font-semibold">Where it is attached</h2>
        {curve.attachments.length === 0 ? (
          <p className="p-4 text-sm text-slate-500">Not attached anywhere. Attach it to a zone, source or stream preset from a home's zone board.</p>
        ) : (
          <ul className="divide-y divide-slate-100" data-testid="attachment-list">
            {curve.attachments.map((a) => (
              <li key={`${a.kind}:${a.targetId}`} className="px-3 py-2 text-sm">
                <Link href={`/homes/${a.homeId}`} className="font-medium text-accent-700 hover:underline">{a.homeName}</Link>
                {" / "}
                {a.zoneName}
                {a.kind !== "zone" ? <> / {a.kind === "source" ? "source" : "stream preset"} “{a.label}”</> : <span className="text-slate-500"> (zone curve)</span>}
                {a.fitProblem ? <p className="mt-1 text-xs text-danger-700" role="note">{a.fitProblem}</p> : null}
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}

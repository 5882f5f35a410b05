"use client";
import Link from "next/link";
import { useMemo, useRef, useState } from "react";
import useSWR from "swr";
import type { LevelMatchDto } from "@/db/queries/level-match";
import { ApiError, sendJson } from "@/lib/fetcher";
import { CLIP_LIMITS, levelMatchUrl, TARGET_LUFS, TRIM, targetKey, type LevelMatchTargetChoice } from "@/lib/validation/level-match";
import { levelMatchTable, type LevelMatchRow } from "@/lib/zones/level-match-rows";
import { Caution, ErrorNotice, HEARING_CAUTION } from "@/components/curves/cautions";
import { formatDb, formatLevel } from "@/components/curves/units";
import { useClipUpload, type UploadState } from "./use-clip-upload";

// Level matching of one zone: upload a clip per source and stream preset, see
// what each measures (LUFS, LU, dBTP), the offset that brings it to the chosen
// reference or target level, what that leaves of the headroom, and apply one
// suggestion or all of them as one zone change.

type Notice = { kind: "ok" | "error" | "stale"; text: string } | null;

export function LevelMatchPanel({ zoneId }: { zoneId: string }) {
  const { data, error, mutate } = useSWR<LevelMatchDto, ApiError>(levelMatchUrl(zoneId));
  const [targetMode, setTargetMode] = useState<"reference" | "lufs">("reference");
  const [referenceKey, setReferenceKey] = useState<string | null>(null);
  const [targetText, setTargetText] = useState(String(TARGET_LUFS.default));
  const [applying, setApplying] = useState<string | null>(null);
  const [notice, setNotice] = useState<Notice>(null);

  const measured = useMemo(() => (data?.items ?? []).filter((i) => i.clip && i.clip.integratedLufs !== null), [data]);
  const refKey = referenceKey && measured.some((i) => targetKey(i.kind, i.id) === referenceKey) ? referenceKey : measured[0] ? targetKey(measured[0].kind, measured[0].id) : null;
  const targetLufsValue = Number(targetText.replace(/\u2212/g, "-"));
  const targetError =
    targetMode === "lufs" && !(Number.isFinite(targetLufsValue) && targetLufsValue >= TARGET_LUFS.min && targetLufsValue <= TARGET_LUFS.max)
      ? `Enter a target between ${TARGET_LUFS.min} and ${TARGET_LUFS.max} LUFS.`
      : null;

  const choice: LevelMatchTargetChoice | null =
    targetMode === "lufs"
      ? targetError
        ? null
        : { kind: "lufs", lufs: targetLufsValue }
      : refKey
        ? { kind: "reference", ref: { kind: refKey.split(":")[0] as "source" | "preset", id: refKey.split(":")[1]! } }
        : null;
  const table = useMemo(() => (data && choice ? levelMatchTable(data.items, choice) : null), [data, JSON.stringify(choice)]); // eslint-disable-line react-hooks/exhaustive-deps

  if (error && !data) return <ErrorNotice testId="level-match-error" onRetry={() => mutate()}>Level match could not be loaded: {error.message}</ErrorNotice>;
  if (!data) return <p role="status" className="text-slate-500">Loading…</p>;

  const rows = table?.rows ?? data.items.map((i) => ({ ...i, key: targetKey(i.kind, i.id), status: i.clip ? "ok" : "no-clip", suggestion: null, headroom: null }) as LevelMatchRow);
  const pending = rows.filter((r) => r.suggestion?.changes);
  const canEdit = data.may.edit;

  async function apply(list: LevelMatchRow[], label: string) {
    if (!data || list.length === 0) return;
    setApplying(label);
    setNotice(null);
    try {
      const result = await sendJson<{ version: number; revision: { number: number; created: boolean }; changes: unknown[] }>(levelMatchUrl(zoneId), "POST", {
        version: data.zone.version,
        items: list.map((r) => ({ kind: r.kind, id: r.id, loudnessOffsetDb: r.suggestion!.offsetDb })),
      });
      await mutate();
      setNotice({
        kind: "ok",
        text: `Applied ${list.length} offset${list.length === 1 ? "" : "s"}${result.revision.created ? ` — revision ${result.revision.number}` : ""}. Push the zone to send it to the device.`,
      });
    } catch (e) {
      if (e instanceof ApiError && e.code === "zone:stale") setNotice({ kind: "stale", text: e.message });
      else setNotice({ kind: "error", text: e instanceof ApiError ? e.message : "The offsets could not be applied." });
    } finally {
      setApplying(null);
    }
  }

  return (
    <div className="space-y-5">
      <div>
        <nav className="text-sm text-slate-500">
          <Link href="/homes" className="hover:underline">Homes</Link> / <Link href={`/homes/${data.zone.homeId}`} className="hover:underline">{data.zone.homeName}</Link> / {data.zone.name}
        </nav>
        <h1 className="mt-1 text-2xl font-semibold">Level match · {data.zone.name}</h1>
        <p className="text-sm text-slate-600">
          Upload a representative clip of each source or station (WAV, up to {CLIP_LIMITS.maxSeconds / 60} minutes and {CLIP_LIMITS.maxBytes / (1024 * 1024)} MB); each is measured as integrated loudness (ITU-R BS.1770-4 / EBU R 128) and true peak. The suggested loudness offset brings it to the reference or target, in {TRIM.stepDb} dB steps within {TRIM.minDb} to +{TRIM.maxDb} dB.
        </p>
        <p className="mt-1 text-sm">
          <Link href={`/zones/${zoneId}/layout`} className="text-accent-700 hover:underline">Output layout of this zone</Link>
        </p>
      </div>

      <fieldset className="rounded-lg border border-slate-200 bg-white p-4" disabled={measured.length === 0 && targetMode === "reference"}>
        <legend className="px-1 font-semibold">Match to</legend>
        <div className="flex flex-wrap items-center gap-6">
          <label className="flex items-center gap-2 text-sm">
            <input type="radio" name="target-mode" checked={targetMode === "reference"} onChange={() => setTargetMode("reference")} />
            a reference source
          </label>
          <label htmlFor="reference" className="sr-only">Reference source or station</label>
          <select
            id="reference"
            value={refKey ?? ""}
            disabled={targetMode !== "reference" || measured.length === 0}
            onChange={(e) => setReferenceKey(e.target.value)}
            className="rounded-md border border-slate-300 px-2 py-1 text-sm"
          >
            {measured.length === 0 ? <option value="">No measured clip yet</option> : null}
            {measured.map((i) => (
              <option key={targetKey(i.kind, i.id)} value={targetKey(i.kind, i.id)}>
                {i.label} ({formatLevel(i.clip!.integratedLufs, "LUFS")})
              </option>
            ))}
          </select>
          <label className="flex items-center gap-2 text-sm">
            <input type="radio" name="target-mode" checked={targetMode === "lufs"} onChange={() => setTargetMode("lufs")} />
            a target level
          </label>
          <span className="flex items-center gap-1 text-sm">
            <label htmlFor="target-lufs" className="sr-only">Target loudness in LUFS</label>
            <input
              id="target-lufs"
              type="number"
              step="0.5"
              min={TARGET_LUFS.min}
              max={TARGET_LUFS.max}
              value={targetText}
              disabled={targetMode !== "lufs"}
              onChange={(e) => setTargetText(e.target.value)}
              aria-invalid={targetError ? true : undefined}
              className="w-24 rounded-md border border-slate-300 px-2 py-1 tabular-nums"
            />
            LUFS
          </span>
        </div>
        {targetError ? <p className="mt-2 text-sm text-danger-700">{targetError}</p> : null}
        {table?.problem ? <p className="mt-2 text-sm text-caution-700">{table.problem}</p> : null}
        {table?.targetLufs !== null && table?.targetLufs !== undefined ? (
          <p className="mt-2 text-sm text-slate-600" data-testid="target-level">
            Target: <strong>{formatLevel(table.targetLufs, "LUFS")}</strong>
          </p>
        ) : null}
      </fieldset>

      {notice ? (
        notice.kind === "ok" ? (
          <p role="status" data-testid="level-match-applied" className="rounded-md bg-accent-50 px-3 py-2 text-sm text-accent-700">{notice.text}</p>
        ) : (
          <ErrorNotice testId="level-match-apply-error">
            {notice.text}
            {notice.kind === "stale" ? (
              <button type="button" onClick={() => { void mutate(); setNotice(null); }} className="ml-2 underline">Reload</button>
            ) : null}
          </ErrorNotice>
        )
      ) : null}

      <section aria-labelledby="clips-heading" className="rounded-lg border border-slate-200 bg-white">
        <div className="flex flex-wrap items-center justify-between gap-2 border-b border-slate-200 p-3">
          <h2 id="clips-heading" className="font-semibold">Sources and stream presets</h2>
          {canEdit ? (
            <button
              type="button"
              onClick={() => apply(pending, "all")}
              disabled={pending.length === 0 || applying !== null}
              className="rounded-md bg-accent-600 px-3 py-1.5 text-sm font-medium text-white hover:bg-accent-700 disabled:opacity-40"
            >
              {applying === "all" ? "Applying…" : `Apply all suggestions (${pending.length})`}
            </button>
          ) : null}
        </div>
        <div className="overflow-x-auto">
          <table className="w-full text-left text-sm" data-testid="level-match-table">
            <thead className="bg-slate-50 text-xs uppercase tracking-wide text-slate-500">
              <tr>
                <th scope="col" className="px-3 py-2">Source / station</th>
                <th scope="col" className="px-3 py-2">Clip</th>
                <th scope="col" className="px-3 py-2 text-right">Integrated</th>
                <th scope="col" className="px-3 py-2 text-right">Range</th>
                <th scope="col" className="px-3 py-2 text-right">True peak</th>
                <th scope="col" className="px-3 py-2 text-right">Offset now</th>
                <th scope="col" className="px-3 py-2 text-right">Suggested</th>
                <th scope="col" className="px-3 py-2 text-right">Peak after</th>
                <th scope="col" className="px-3 py-2"><span className="sr-only">Actions</span></th>
              </tr>
            </thead>
            <tbody className="divide-y divide-slate-100">
              {rows.map((r) => (
                <LevelMatchTableRow key={r.key} row={r} zoneId={zoneId} canEdit={canEdit} applying={applying} onApply={() => apply([r], r.key)} onUploaded={() => void mutate()} />
              ))}
            </tbody>
          </table>
        </div>
        <p className="border-t border-slate-100 px-3 py-2 text-xs text-slate-500">
          Integrated loudness in LUFS and loudness range in LU (EBU Tech 3342); true peak in dBTP (BS.1770-4 Annex 2, 4× oversampling or more). “Peak after” adds the suggested offset and the largest boost of the zone's and the source's tone curves to the measured true peak — an upper bound; over 0 dBTP it could clip.
        </p>
      </section>

      <Caution title="Levels and hearing" testId="level-match-caution">
        Raising a quiet source raises everything it plays, peaks included; clipping sounds harsh and strains speakers. {HEARING_CAUTION}
      </Caution>
    </div>
  );
}

function LevelMatchTableRow({
  row,
  zoneId,
  canEdit,
  applying,
  onApply,
  onUploaded,
}: {
  row: LevelMatchRow;
  zoneId: string;
  canEdit: boolean;
  applying: string | null;
  onApply: () => void;
  onUploaded: () => void;
}) {
  const { state, upload, cancel } = useClipUpload(zoneId, onUploaded);
  const input = useRef<HTMLInputElement>(null);
  const clip = row.clip;
  const s = row.suggestion;
  const h = row.headroom;
  return (
    <tr data-testid="level-match-row" data-key={row.key} className={row.enabled ? "" : "text-slate-400"}>
      <th scope="row" className="px-3 py-2 text-left align-top font-medium">
        {row.label}
        <span className="block text-xs font-normal text-slate-500">{row.kind === "source" ? "source" : "stream preset"}{row.enabled ? "" : " · disabled"}</span>
      </th>
      <td className="px-3 py-2 align-top">
        {clip ? (
          <span className="text-slate-700">
            {clip.fileName}
            <span className="block text-xs text-slate-500">
              {clip.durationSeconds.toFixed(1)} s · {(clip.sampleRate / 1000).toFixed(1).replace(/\.0$/, "")} kHz · {clip.channelCount} ch
            </span>
          </span>
        ) : (
          <span className="text-slate-500">No clip yet</span>
        )}
        <UploadStatus state={state} onCancel={cancel} />
      </td>
      <td className="px-3 py-2 text-right align-top tabular-nums" data-testid="measured-lufs">
        {clip ? (clip.integratedLufs === null ? "silent" : formatLevel(clip.integratedLufs, "LUFS")) : "–"}
      </td>
      <td className="px-3 py-2 text-right align-top tabular-nums">{clip?.loudnessRangeLu !== null && clip?.loudnessRangeLu !== undefined ? `${clip.loudnessRangeLu.toFixed(1)} LU` : "–"}</td>
      <td className="px-3 py-2 text-right align-top tabular-nums">{clip ? formatLevel(clip.truePeakDbtp, "dBTP") : "–"}</td>
      <td className="px-3 py-2 text-right align-top tabular-nums" data-testid="current-offset">{formatDb(row.loudnessOffsetDb)}</td>
      <td className="px-3 py-2 text-right align-top tabular-nums" data-testid="suggested-offset">
        {s ? (
          <>
            <span className={s.changes ? "font-semibold" : undefined}>{formatDb(s.offsetDb)}</span>
            {s.clamped ? <span className="block text-xs text-caution-700">limit reached (needs {formatDb(s.exactOffsetDb)})</span> : null}
          </>
        ) : (
          "–"
        )}
      </td>
      <td className="px-3 py-2 text-right align-top tabular-nums">
        {h ? (
          <>
            {formatLevel(h.predictedPeakDbtp, "dBTP")}
            <span className={`block text-xs ${h.wouldClip ? "font-medium text-danger-700" : "text-slate-500"}`} data-testid={h.wouldClip ? "could-clip" : undefined}>
              {h.wouldClip ? `could clip: lower by ${formatDb(h.suggestedPreAttenuationDb, "dB", { plus: false })}` : `${formatDb(h.headroomDb, "dB", { plus: false })} headroom`}
            </span>
            {row.chainBoostDb > 0.05 ? <span className="block text-xs text-slate-500">incl. curve boost {formatDb(row.chainBoostDb)}</span> : null}
          </>
        ) : (
          "–"
        )}
      </td>
      <td className="px-3 py-2 align-top">
        {canEdit ? (
          <div className="flex flex-col items-end gap-1">
            <input
              ref={input}
              type="file"
              accept=".wav,audio/wav,audio/x-wav,audio/wave"
              className="sr-only"
              tabIndex={-1}
              aria-label={`Clip for ${row.label}`}
              data-testid="clip-input"
              onChange={(e) => {
                const f = e.target.files?.[0];
                if (f) upload(f, { kind: row.kind, id: row.id });
                e.target.value = "";
              }}
            />
            <button
              type="button"
              onClick={() => input.current?.click()}
              disabled={state.phase === "uploading" || state.phase === "measuring"}
              className="whitespace-nowrap rounded-md px-2 py-1 text-xs ring-1 ring-slate-300 hover:bg-slate-50 disabled:opacity-40"
            >
              {clip ? "Upload new clip" : "Upload clip"}
            </button>
            {s?.changes ? (
              <button
                type="button"
                onClick={onApply}
                disabled={applying !== null}
                className="whitespace-nowrap rounded-md bg-accent-50 px-2 py-1 text-xs font-medium text-accent-700 ring-1 ring-accent-600/40 disabled:opacity-40"
              >
                {applying === row.key ? "Applying…" : `Apply ${formatDb(s.offsetDb)}`}
              </button>
            ) : null}
          </div>
        ) : null}
      </td>
    </tr>
  );
}

function UploadStatus({ state, onCancel }: { state: UploadState; onCancel: () => void }) {
  if (state.phase === "idle" || state.phase === "done") return null;
  if (state.phase === "error") {
    return (
      <p role="alert" data-testid="clip-error" className="mt-1 max-w-xs text-xs text-danger-700">
        {state.message}
      </p>
    );
  }
  if (state.phase === "measuring") {
    return <p role="status" className="mt-1 text-xs text-slate-600">Measuring {state.fileName}…</p>;
  }
  const percent = state.total > 0 ? Math.round((state.loaded / state.total) * 100) : 0;
  return (
    <div className="mt-1 flex items-center gap-2 text-xs text-slate-600" role="status" data-testid="clip-progress">
      <progress max={100} value={percent} aria-label={`Uploading ${state.fileName}`} className="h-2 w-28" />
      {percent} %
      <button type="button" onClick={onCancel} className="underline">Cancel</button>
    </div>
  );
}

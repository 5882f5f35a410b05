"use client";
import Link from "next/link";
import { DriftBadge } from "@/components/fleet/drift-badge";
import { useDroppable } from "@dnd-kit/core";
import { SortableContext } from "@dnd-kit/sortable";
import { memo, useContext, useMemo, type ReactNode } from "react";
import { chainBoostDb, clipCaution, volumeCeilingCaution } from "@/lib/board/cautions";
import { formatWhen, slotsSentence } from "@/lib/board/rules";
import type { BoardCurveDto, BoardPermissions, ZoneColumnDto } from "@/lib/board/types";
import { DropRefusalContext, PresetCardBody, SortableCard, SourceCardBody } from "./board-cards";
import { accepts, dataOf, dragId, listStrategy, type DragData } from "./drag-model";

export interface ColumnActions {
  editZone: (zoneId: string) => void;
  lock: (zoneId: string) => void;
  unlock: (zoneId: string) => void;
  addSource: (zoneId: string) => void;
  editSource: (zoneId: string, sourceId: string) => void;
  addPreset: (zoneId: string) => void;
  editPreset: (zoneId: string, presetId: string) => void;
  removeZoneCurve: (zoneId: string) => void;
}

function ago(iso: string | null) {
  if (!iso) return "never reported";
  const minutes = Math.round((Date.now() - Date.parse(iso)) / 60_000);
  if (minutes < 1) return "reported just now";
  if (minutes < 60) return `reported ${minutes} min ago`;
  if (minutes < 48 * 60) return `reported ${Math.round(minutes / 60)} h ago`;
  return `reported ${formatWhen(iso)}`;
}

function Allowed({ on, label }: { on: boolean; label: string }) {
  return (
    <li className="flex items-center gap-1.5">
      <span aria-hidden="true" className={on ? "text-accent-600" : "text-slate-400"}>{on ? "✓" : "✕"}</span>
      <span>
        {label}: <span className="text-slate-500">{on ? "allowed" : "not allowed"}</span>
      </span>
    </li>
  );
}

/**
 * The zone's "Zone curve" line as a drop target for a curve from the tray: the
 * zone curve applies to everything the zone plays, in series with each card's.
 */
function ZoneCurveDrop({ zoneId, children }: { zoneId: string; children: ReactNode }) {
  const data: DragData = { kind: "zone-curve", zoneId };
  const { setNodeRef, isOver, active } = useDroppable({ id: dragId.zoneCurve(zoneId), data });
  const refusalFor = useContext(DropRefusalContext);
  const activeData = dataOf(active);
  const curveDrag = activeData?.kind === "curve";
  const target = isOver && activeData !== null && accepts(activeData, data);
  const refusal = target && activeData ? refusalFor(activeData, data) : null;
  return (
    <dd
      ref={setNodeRef}
      className={`relative -mx-1 flex min-w-0 items-center gap-1 rounded px-1 ${target ? (refusal ? "ring-2 ring-danger-600" : "ring-2 ring-accent-500") : curveDrag ? "outline-dashed outline-1 outline-accent-500/60" : ""}`}
      data-testid="zone-curve"
      data-drop-state={target ? (refusal ? "refused" : "accepts") : undefined}
    >
      {children}
      {target ? (
        <p
          className={`pointer-events-none absolute inset-x-0 top-full z-10 mt-0.5 rounded px-2 py-0.5 text-xs shadow ${refusal ? "bg-danger-50 text-danger-700 ring-1 ring-danger-600/40" : "bg-accent-50 text-accent-700 ring-1 ring-accent-500/40"}`}
          data-testid="drop-hint"
        >
          {refusal ?? "Drop to make this the zone curve"}
        </p>
      ) : null}
    </dd>
  );
}

/**
 * A zone's preset list as a drop target for another zone's preset. Its own
 * component, so that while something is dragged only this wrapper re-renders
 * and not the whole column (its children are the same elements).
 */
function PresetListDrop({ zoneId, children }: { zoneId: string; children: ReactNode }) {
  const data: DragData = { kind: "preset-list", zoneId };
  const { setNodeRef, isOver, active } = useDroppable({ id: dragId.presetList(zoneId), data });
  const refusalFor = useContext(DropRefusalContext);
  const activeData = dataOf(active);
  const target = isOver && activeData !== null && accepts(activeData, data);
  const refusal = target && activeData ? refusalFor(activeData, data) : null;
  return (
    <div
      ref={setNodeRef}
      className={`relative m-2 mt-0 flex-1 rounded-md p-1 ${target ? (refusal ? "ring-2 ring-danger-600" : "ring-2 ring-accent-500") : ""}`}
      data-testid="preset-list"
      data-drop-state={target ? (refusal ? "refused" : "accepts") : undefined}
    >
      {/* Overlaid, not in the flow (see SortableCard). */}
      {target ? (
        <p
          className={`pointer-events-none absolute inset-x-1 -top-1 z-20 -translate-y-full rounded px-2 py-0.5 text-xs shadow ${refusal ? "bg-danger-50 text-danger-700 ring-1 ring-danger-600/40" : "bg-accent-50 text-accent-700 ring-1 ring-accent-500/40"}`}
          data-testid="drop-hint"
        >
          {refusal ?? "Drop to move or copy here"}
        </p>
      ) : null}
      {children}
    </div>
  );
}

/** One zone of the board: device, limits, guest controls with their lock, then its sources and stream presets. */
export const ZoneColumn = memo(function ZoneColumn({
  zone,
  curves,
  may,
  editRefusal,
  actions,
}: {
  zone: ZoneColumnDto;
  curves: Map<string, BoardCurveDto>;
  may: BoardPermissions;
  /** Why this person may not change this zone (role, lock), or null. */
  editRefusal: string | null;
  actions: ColumnActions;
}) {
  const zoneCurve = zone.toneCurveId ? curves.get(zone.toneCurveId) ?? null : null;
  const canEdit = editRefusal === null;
  const ceilingCaution = volumeCeilingCaution(zone.volumeCeiling);

  // Card cautions only change when this zone or the library does.
  const cautions = useMemo(() => {
    const of = (card: { loudnessOffsetDb: number; toneCurveId: string | null; truePeakDbtp: number | null }) =>
      clipCaution({
        loudnessOffsetDb: card.loudnessOffsetDb,
        chainBoostDb: chainBoostDb(zoneCurve?.bands ?? null, card.toneCurveId ? curves.get(card.toneCurveId)?.bands ?? null : null),
        truePeakDbtp: card.truePeakDbtp,
      })?.message ?? null;
    return new Map([...zone.sources, ...zone.presets].map((c) => [c.id, of(c)]));
  }, [zone, zoneCurve, curves]);

  const sourceIds = useMemo(() => zone.sources.map((s) => dragId.source(s.id)), [zone.sources]);
  const presetIds = useMemo(() => zone.presets.map((p) => dragId.preset(p.id)), [zone.presets]);

  const g = zone.guest;
  const sourceDragOff = !may.editZone;
  const presetDragOff = !may.editZone && !may.reorderPresets;

  return (
    <section
      aria-labelledby={`zone-${zone.id}-title`}
      data-testid="zone-column"
      data-zone-name={zone.name}
      className="flex w-72 shrink-0 flex-col rounded-lg border border-slate-200 bg-slate-50"
    >
      <header className="border-b border-slate-200 bg-white p-3">
        <div className="flex items-start justify-between gap-2">
          <h2 id={`zone-${zone.id}-title`} className="font-semibold">{zone.name}</h2>
          {may.editZone ? (
            <button
              type="button"
              onClick={() => actions.editZone(zone.id)}
              disabled={!canEdit}
              title={editRefusal ?? undefined}
              className="rounded px-2 py-0.5 text-sm text-accent-700 ring-1 ring-accent-500/40 hover:bg-accent-50 disabled:cursor-not-allowed disabled:opacity-50"
              aria-label={`Edit zone ${zone.name}`}
            >
              Edit
            </button>
          ) : null}
        </div>
        {zone.device ? (
          <div className="mt-1">
            <DriftBadge zoneId={zone.id} />
          </div>
        ) : null}
        {zone.device ? (
          <p className="mt-1 text-xs text-slate-600" data-testid="zone-device">
            <span className={`mr-1 rounded px-1.5 py-0.5 ${zone.device.online ? "bg-accent-50 text-accent-700" : "bg-caution-50 text-caution-700"}`}>
              {zone.device.online ? "online" : "offline"}
            </span>
            {zone.device.profile.name} · {zone.device.serial} · {ago(zone.device.lastReportAt)}
          </p>
        ) : (
          <p className="mt-1 text-xs text-caution-700">No device bound to this zone.</p>
        )}
        <nav aria-label={`More for ${zone.name}`} className="mt-1 flex flex-wrap gap-x-3 text-xs">
          <Link href={`/zones/${zone.id}/level-match`} className="text-accent-700 hover:underline">Level match</Link>
          <Link href={`/zones/${zone.id}/layout`} className="text-accent-700 hover:underline">Output layout</Link>
          <Link href={`/zones/${zone.id}/history`} className="text-accent-700 hover:underline">History</Link>
        </nav>
        <dl className="mt-2 grid grid-cols-2 gap-x-2 text-sm">
          <dt className="text-slate-500">Volume ceiling</dt>
          <dd className="tabular-nums" data-testid="zone-ceiling">
            {zone.volumeCeiling} %
          </dd>
          <dt className="text-slate-500">Turn-on volume</dt>
          <dd className="tabular-nums">{zone.turnOnVolume} %</dd>
          <dt className="text-slate-500">Zone curve</dt>
          <ZoneCurveDrop zoneId={zone.id}>
            <span className="truncate" data-testid="zone-curve-name">{zoneCurve?.name ?? "none"}</span>
            {zoneCurve && may.editZone && !editRefusal ? (
              <button
                type="button"
                onClick={() => actions.removeZoneCurve(zone.id)}
                aria-label={`Remove the zone curve of ${zone.name}`}
                title="Remove the zone curve"
                className="shrink-0 rounded px-1 text-slate-400 hover:bg-slate-100 hover:text-slate-700 focus-visible:outline focus-visible:outline-2 focus-visible:outline-accent-600"
              >
                <span aria-hidden="true">✕</span>
              </button>
            ) : null}
          </ZoneCurveDrop>
        </dl>
        {ceilingCaution ? (
          <p className="mt-1 text-xs text-caution-700" data-testid="ceiling-caution" title={ceilingCaution}>
            <span aria-hidden="true">⚠ </span>High ceiling: a risk to hearing and speakers.<span className="sr-only"> {ceilingCaution}</span>
          </p>
        ) : null}

        <div className={`mt-2 rounded-md border p-2 text-xs ${g.locked ? "border-caution-500/50 bg-caution-50" : "border-slate-200"}`} data-testid="guest-controls">
          <div className="flex items-center justify-between gap-2">
            <span className="font-semibold text-slate-700">Guest controls{g.locked ? " · locked" : ""}</span>
            {g.locked && may.unlock ? (
              <button type="button" onClick={() => actions.unlock(zone.id)} className="rounded px-1.5 py-0.5 text-caution-700 ring-1 ring-caution-500/50 hover:bg-white">
                Unlock…
              </button>
            ) : null}
            {!g.locked && may.lock ? (
              <button type="button" onClick={() => actions.lock(zone.id)} className="rounded px-1.5 py-0.5 text-slate-700 ring-1 ring-slate-300 hover:bg-slate-50">
                Lock…
              </button>
            ) : null}
          </div>
          <ul className="mt-1 space-y-0.5 text-slate-700">
            <Allowed on={g.volume} label="Change volume" />
            <Allowed on={g.source} label="Switch source" />
            <Allowed on={g.wake} label="Wake the zone" />
          </ul>
          {g.locked ? (
            <p className="mt-1 text-caution-700" data-testid="lock-info">
              <span aria-hidden="true">🔒 </span>Locked by {g.lockedByName ?? "support"} on {formatWhen(g.lockedAt)}
              {g.lockReason ? <>: “{g.lockReason}”</> : null}
              {!may.unlock ? " — only support, an integrator or the owner can change this zone now." : null}
            </p>
          ) : null}
        </div>
      </header>

      <div className="p-2">
        <div className="flex items-center justify-between px-1">
          <h3 className="text-xs font-semibold uppercase tracking-wide text-slate-500">Sources ({zone.sources.length})</h3>
          {may.editZone ? (
            <button type="button" disabled={!canEdit} title={editRefusal ?? undefined} onClick={() => actions.addSource(zone.id)} className="text-xs text-accent-700 hover:underline disabled:opacity-50" aria-label={`Add a source to ${zone.name}`}>
              + Add
            </button>
          ) : null}
        </div>
        <SortableContext id={`sources-${zone.id}`} items={sourceIds} strategy={listStrategy}>
          <ul className="mt-1 space-y-1.5" aria-label={`Sources of ${zone.name}`}>
            {zone.sources.length === 0 ? <li className="px-1 text-xs text-slate-500">No sources yet.</li> : null}
            {zone.sources.map((s) => (
              <SortableCard
                key={s.id}
                id={dragId.source(s.id)}
                data={{ kind: "source", id: s.id, zoneId: zone.id }}
                dragDisabled={sourceDragOff}
                handleLabel={`Drag source ${s.label}`}
                testId="source-card"
              >
                <SourceCardBody
                  source={s}
                  zoneId={zone.id}
                  curveName={s.toneCurveId ? curves.get(s.toneCurveId)?.name ?? "unknown curve" : null}
                  caution={cautions.get(s.id) ?? null}
                  canEdit={may.editZone}
                  onEdit={actions.editSource}
                />
              </SortableCard>
            ))}
          </ul>
        </SortableContext>
      </div>

      <PresetListDrop zoneId={zone.id}>
        <div className="flex items-center justify-between px-1">
          <h3 className="text-xs font-semibold uppercase tracking-wide text-slate-500" title={slotsSentence(zone)}>
            Stream presets ({zone.presets.length}/{zone.presetSlots})
          </h3>
          {may.editZone ? (
            <button
              type="button"
              disabled={!canEdit}
              title={editRefusal ?? undefined}
              onClick={() => actions.addPreset(zone.id)}
              className="text-xs text-accent-700 hover:underline disabled:opacity-50"
              aria-label={`Add a stream preset to ${zone.name}`}
            >
              + Add
            </button>
          ) : null}
        </div>
        <SortableContext id={`presets-${zone.id}`} items={presetIds} strategy={listStrategy}>
          <ol className="mt-1 min-h-8 space-y-1.5" aria-label={`Stream presets of ${zone.name}`}>
            {zone.presets.length === 0 ? <li className="px-1 text-xs text-slate-500">No stream presets yet.</li> : null}
            {zone.presets.map((p, index) => (
              <SortableCard
                key={p.id}
                id={dragId.preset(p.id)}
                data={{ kind: "preset", id: p.id, zoneId: zone.id }}
                dragDisabled={presetDragOff}
                handleLabel={`Drag preset ${p.name}`}
                testId="preset-card"
              >
                <PresetCardBody
                  preset={p}
                  index={index}
                  zoneId={zone.id}
                  curveName={p.toneCurveId ? curves.get(p.toneCurveId)?.name ?? "unknown curve" : null}
                  caution={cautions.get(p.id) ?? null}
                  canEdit={may.editZone}
                  onEdit={actions.editPreset}
                />
              </SortableCard>
            ))}
          </ol>
        </SortableContext>
      </PresetListDrop>
    </section>
  );
});

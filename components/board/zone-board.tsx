"use client";
import {
  DndContext,
  DragOverlay,
  KeyboardSensor,
  MeasuringStrategy,
  PointerSensor,
  useSensor,
  useSensors,
  type Announcements,
  type DragEndEvent,
  type DragStartEvent,
} from "@dnd-kit/core";
import { arrayMove } from "@dnd-kit/sortable";
import { useCallback, useEffect, useMemo, useRef, useState } from "react";
import { curveRefusal, zoneCurveRefusal, lockSentence, presetReorderRefusal, transferRefusal, zoneEditRefusal } from "@/lib/board/rules";
import type { BoardDto, ZoneColumnDto } from "@/lib/board/types";
import { roleLabels } from "@/lib/permissions";
import { EmptyState } from "@/components/ui/empty-state";
import { DropRefusalContext } from "./board-cards";
import { writes } from "./board-writes";
import { CurveTray } from "./curve-tray";
import { accepts, boardCollisions, boardKeyboardCoordinates, dataOf, type DragData } from "./drag-model";
import { LockDialog } from "./lock-dialog";
import { PresetDialog } from "./preset-dialog";
import { SourceDialog } from "./source-dialog";
import { TransferDialog } from "./transfer-dialog";
import { useBoard } from "./use-board";
import { ZoneColumn, type ColumnActions } from "./zone-column";
import { ZoneDialog } from "./zone-dialog";

type DialogState =
  | { type: "zone"; zoneId: string }
  | { type: "lock" | "unlock"; zoneId: string }
  | { type: "source"; zoneId: string; cardId?: string }
  | { type: "preset"; zoneId: string; cardId?: string }
  | { type: "transfer"; zoneId: string; presetId: string; toZoneId: string };

const zoneOf = (board: BoardDto, zoneId: string) => board.zones.find((z) => z.id === zoneId);

/** Why dropping `active` on `over` is refused (role, lock, slots, EQ bands), or null. */
export function dropRefusal(board: BoardDto, active: DragData, over: DragData): string | null {
  if (over.kind === "curve") return null;
  const target = zoneOf(board, over.zoneId);
  if (!target) return "That zone is no longer on the board.";
  if (active.kind === "curve") return over.kind === "zone-curve" ? zoneCurveRefusal(board, target, active.id) : curveRefusal(board, target, active.id);
  if (active.kind === "source") return zoneEditRefusal(board, target);
  if (active.kind === "preset") {
    if (active.zoneId === target.id) return presetReorderRefusal(board, target);
    const from = zoneOf(board, active.zoneId);
    if (!from) return "That zone is no longer on the board.";
    // Refused only when neither a move nor a copy could land here.
    return transferRefusal(board, from, target, "copy") && transferRefusal(board, from, target, "move");
  }
  return null;
}

function describe(board: BoardDto | undefined, d: DragData | null): string {
  if (!board || !d) return "nothing";
  if (d.kind === "curve") return `tone curve “${board.curves.find((c) => c.id === d.id)?.name ?? "?"}”`;
  const zone = zoneOf(board, d.zoneId);
  if (!zone) return "a card";
  if (d.kind === "preset-list") return `the stream presets of ${zone.name}`;
  if (d.kind === "zone-curve") return `the zone curve of ${zone.name}`;
  if (d.kind === "source") {
    const i = zone.sources.findIndex((s) => s.id === d.id);
    return `source “${zone.sources[i]?.label}” of ${zone.name}, position ${i + 1} of ${zone.sources.length}`;
  }
  const i = zone.presets.findIndex((p) => p.id === d.id);
  return `stream preset “${zone.presets[i]?.name}” of ${zone.name}, position ${i + 1} of ${zone.presets.length}`;
}

const instructions =
  "To pick up a source, a stream preset or a tone curve, focus its handle and press Space or Enter. " +
  "Use the arrow keys to move it: up and down within a list, left and right to other zones. " +
  "Press Space or Enter again to drop it, or Escape to cancel.";

/** The zone board of one home: every zone side by side, edited by drag and drop and in dialogs. */
export function ZoneBoard({ homeId }: { homeId: string }) {
  const api = useBoard(homeId);
  const { board, write, notify } = api;
  const boardRef = useRef(board);
  boardRef.current = board;
  const [dialog, setDialog] = useState<DialogState | null>(null);
  const [dragging, setDragging] = useState<DragData | null>(null);

  const sensors = useSensors(
    useSensor(PointerSensor, { activationConstraint: { distance: 6 } }),
    useSensor(KeyboardSensor, { coordinateGetter: boardKeyboardCoordinates }),
  );

  const curves = useMemo(() => new Map((board?.curves ?? []).map((c) => [c.id, c])), [board?.curves]);

  const actions = useMemo<ColumnActions>(
    () => ({
      editZone: (zoneId) => setDialog({ type: "zone", zoneId }),
      lock: (zoneId) => setDialog({ type: "lock", zoneId }),
      unlock: (zoneId) => setDialog({ type: "unlock", zoneId }),
      addSource: (zoneId) => setDialog({ type: "source", zoneId }),
      editSource: (zoneId, cardId) => setDialog({ type: "source", zoneId, cardId }),
      addPreset: (zoneId) => setDialog({ type: "preset", zoneId }),
      editPreset: (zoneId, cardId) => setDialog({ type: "preset", zoneId, cardId }),
      removeZoneCurve: (zoneId) => {
        const zone = boardRef.current ? zoneOf(boardRef.current, zoneId) : undefined;
        if (zone?.toneCurveId) void write(writes.attachCurve(zoneId, { type: "zone", name: zone.name }, null));
      },
    }),
    [write],
  );

  const refusalFor = useCallback((active: DragData, over: DragData) => {
    const b = boardRef.current;
    return b ? dropRefusal(b, active, over) : null;
  }, []);

  const announcements = useMemo<Announcements>(
    () => ({
      onDragStart: ({ active }) => `Picked up ${describe(boardRef.current, dataOf(active))}.`,
      onDragOver: ({ active, over }) => {
        // Over itself (the first move of a pick-up): the pick-up message stands.
        if (over?.id === active.id) return undefined;
        const a = dataOf(active);
        const o = dataOf(over);
        if (!a || !o || !accepts(a, o)) return `${describe(boardRef.current, a)} is not over a place that takes it.`;
        const refusal = refusalFor(a, o);
        if (refusal) return `Over ${describe(boardRef.current, o)}. Dropping here is refused: ${refusal}`;
        if (a.kind === "curve" && o.kind === "zone-curve") return `Over ${describe(boardRef.current, o)}. Drop to make it the zone curve.`;
        if (a.kind === "curve") return `Over ${describe(boardRef.current, o)}. Drop to attach the curve.`;
        if (o.kind === "preset-list" || ("zoneId" in a && "zoneId" in o && a.zoneId !== o.zoneId)) {
          return `Over the stream presets of ${zoneOf(boardRef.current!, (o as { zoneId: string }).zoneId)?.name}. Drop to choose move or copy.`;
        }
        return `Now at ${describe(boardRef.current, o).replace(/^.*, position/, "position")}.`;
      },
      onDragEnd: ({ active, over }) => {
        const a = dataOf(active);
        const o = dataOf(over);
        if (!a || !o || !accepts(a, o)) return `Dropped ${describe(boardRef.current, a)} where it cannot go. Nothing changed.`;
        const refusal = refusalFor(a, o);
        if (refusal) return `Refused: ${refusal} Nothing changed.`;
        if (a.kind === "curve" && o.kind === "zone-curve") return `${describe(boardRef.current, a)} is now ${describe(boardRef.current, o)}.`;
        if (a.kind === "curve") return `Attached ${describe(boardRef.current, a)} to ${describe(boardRef.current, o)}.`;
        if (o.kind === "preset-list" || ("zoneId" in a && "zoneId" in o && a.zoneId !== o.zoneId)) return "Dropped. Choose whether to move or copy it.";
        return `Dropped ${describe(boardRef.current, a)} at ${describe(boardRef.current, o).replace(/^.*, position/, "position")}.`;
      },
      onDragCancel: ({ active }) => `Cancelled. ${describe(boardRef.current, dataOf(active))} is back where it was.`,
    }),
    [refusalFor],
  );

  const onDragStart = useCallback((event: DragStartEvent) => setDragging(dataOf(event.active)), []);
  const onDragCancel = useCallback(() => setDragging(null), []);

  const onDragEnd = useCallback(
    (event: DragEndEvent) => {
      setDragging(null);
      const b = boardRef.current;
      const a = dataOf(event.active);
      const o = dataOf(event.over);
      if (!b || !a || !o || !accepts(a, o)) return;
      const refusal = dropRefusal(b, a, o);
      if (refusal) {
        notify("refused", `Not done: ${refusal}`);
        return;
      }
      if (o.kind === "curve") return;
      const zone = zoneOf(b, o.zoneId)!;
      if (a.kind === "curve" && o.kind === "zone-curve") {
        if (zone.toneCurveId === a.id) return;
        const curve = b.curves.find((c) => c.id === a.id)!;
        void write(writes.attachCurve(zone.id, { type: "zone", name: zone.name }, { id: curve.id, name: curve.name }));
        return;
      }
      if (a.kind === "curve") {
        if (o.kind === "preset-list" || o.kind === "zone-curve") return;
        const card = o.kind === "source" ? zone.sources.find((s) => s.id === o.id) : zone.presets.find((p) => p.id === o.id);
        if (!card || card.toneCurveId === a.id || card.id.startsWith("pending-")) return;
        const curve = b.curves.find((c) => c.id === a.id)!;
        const name = "label" in card ? card.label : card.name;
        void write(writes.attachCurve(zone.id, { type: o.kind, id: card.id, name }, { id: curve.id, name: curve.name }));
        return;
      }
      if (a.kind === "source" && o.kind === "source") {
        const ids = zone.sources.map((s) => s.id);
        const from = ids.indexOf(a.id);
        const to = ids.indexOf(o.id);
        if (from < 0 || to < 0 || from === to) return;
        void write(writes.reorderSources(zone.id, zone.name, arrayMove(ids, from, to)));
        return;
      }
      if (a.kind === "preset") {
        if (a.zoneId !== zone.id) {
          setDialog({ type: "transfer", zoneId: a.zoneId, presetId: a.id, toZoneId: zone.id });
          return;
        }
        if (o.kind !== "preset") return;
        const ids = zone.presets.map((p) => p.id);
        const from = ids.indexOf(a.id);
        const to = ids.indexOf(o.id);
        if (from < 0 || to < 0 || from === to) return;
        void write(writes.reorderPresets(zone.id, zone.name, arrayMove(ids, from, to)));
      }
    },
    [notify, write],
  );

  if (!board) {
    return (
      <div role="alert" className="rounded-lg border border-danger-600/30 bg-danger-50 p-4 text-sm text-danger-700" data-testid="board-error">
        The board could not be loaded{api.error ? `: ${api.error.message}` : "."}{" "}
        <button type="button" onClick={() => void api.reload()} className="ml-2 rounded bg-white px-2 py-0.5 ring-1 ring-danger-600/40">Retry</button>
      </div>
    );
  }

  const dialogZone = dialog ? zoneOf(board, dialog.zoneId) : undefined;

  return (
    <div>
      <BoardStatus api={api} />
      <DndContext
        sensors={sensors}
        collisionDetection={boardCollisions}
        onDragStart={onDragStart}
        onDragEnd={onDragEnd}
        onDragCancel={onDragCancel}
        measuring={{ droppable: { strategy: MeasuringStrategy.WhileDragging } }}
        // A curve is picked up in the sticky tray at the top edge, where auto-scroll
        // would start at once and pull the board away; the wheel still scrolls.
        autoScroll={dragging?.kind !== "curve"}
        accessibility={{ announcements, screenReaderInstructions: { draggable: instructions } }}
      >
        {board.may.editZone ? (
          <CurveTray curves={board.curves} />
        ) : (
          <p className="rounded-md bg-slate-100 px-3 py-2 text-sm text-slate-600" data-testid="read-only-note">
            {roleLabels[board.actor.role]}: you can see this board{board.may.lock ? " and lock or unlock guest controls" : ""}; changes to zones are made by
            integrators{board.actor.role === "installer" ? " and installers assigned to this home" : ""}.
          </p>
        )}
        <p className="mt-2 text-xs text-slate-500">
          <span className="text-caution-700" aria-hidden="true">⚠</span> on a card: its loudness offset plus its tone-curve boost could clip (peaks above 0 dBTP,
          from its measured clip or assuming full-scale material). Cautions never block a change.
        </p>
        {board.zones.length === 0 ? (
          <div className="mt-4">
            <EmptyState title="No zones in this home yet." />
          </div>
        ) : (
          <DropRefusalContext.Provider value={refusalFor}>
            <div className="mt-4 flex items-start gap-3 overflow-x-auto pb-4" data-testid="zone-board">
              {board.zones.map((zone) => (
                <ZoneColumn key={zone.id} zone={zone} curves={curves} may={board.may} editRefusal={zoneEditRefusal(board, zone)} actions={actions} />
              ))}
            </div>
          </DropRefusalContext.Provider>
        )}
        <DragOverlay dropAnimation={null}>{dragging ? <DragPreview board={board} data={dragging} /> : null}</DragOverlay>
      </DndContext>

      {dialog && dialogZone ? <BoardDialogs board={board} zone={dialogZone} dialog={dialog} close={() => setDialog(null)} write={write} /> : null}
    </div>
  );
}

function DragPreview({ board, data }: { board: BoardDto; data: DragData }) {
  let text = "";
  if (data.kind === "curve") text = `Tone curve: ${board.curves.find((c) => c.id === data.id)?.name ?? ""}`;
  else if (data.kind === "source") text = zoneOf(board, data.zoneId)?.sources.find((s) => s.id === data.id)?.label ?? "";
  else if (data.kind === "preset") text = zoneOf(board, data.zoneId)?.presets.find((p) => p.id === data.id)?.name ?? "";
  return <div className="pointer-events-none w-64 rounded-md bg-white px-3 py-2 text-sm font-medium shadow-lg ring-2 ring-accent-500">{text}</div>;
}

function BoardStatus({ api }: { api: ReturnType<typeof useBoard> }) {
  const { notices, dismiss, conflict } = api;
  useEffect(() => {
    const done = notices.filter((n) => n.tone === "done");
    if (done.length === 0) return;
    const t = setTimeout(() => done.forEach((n) => dismiss(n.id)), 6000);
    return () => clearTimeout(t);
  }, [notices, dismiss]);
  return (
    <div className="mb-3 space-y-2">
      <p className="text-xs text-slate-500" aria-live="polite" data-testid="save-state">
        {api.saving ? "Saving…" : api.isValidating ? "Refreshing…" : "All changes saved."}
      </p>
      {conflict ? (
        <div role="alert" data-testid="board-conflict" className="flex flex-wrap items-center justify-between gap-2 rounded-md border border-caution-500/50 bg-caution-50 px-3 py-2 text-sm text-caution-700">
          <span>{conflict} Your change was not saved.</span>
          <span className="flex gap-2">
            <button type="button" onClick={() => void api.reload()} className="rounded bg-white px-2 py-0.5 font-medium ring-1 ring-caution-500/60">Reload the board</button>
            <button type="button" onClick={api.dismissConflict} className="underline">Dismiss</button>
          </span>
        </div>
      ) : null}
      {notices.map((n) => (
        <div
          key={n.id}
          role={n.tone === "done" ? "status" : "alert"}
          data-testid="board-notice"
          className={`flex items-center justify-between gap-2 rounded-md px-3 py-2 text-sm ${n.tone === "done" ? "bg-accent-50 text-accent-700" : "border border-danger-600/30 bg-danger-50 text-danger-700"}`}
        >
          <span>{n.text}</span>
          <button type="button" onClick={() => dismiss(n.id)} className="shrink-0 underline" aria-label="Dismiss message">Dismiss</button>
        </div>
      ))}
    </div>
  );
}

function BoardDialogs({
  board,
  zone,
  dialog,
  close,
  write,
}: {
  board: BoardDto;
  zone: ZoneColumnDto;
  dialog: DialogState;
  close: () => void;
  write: ReturnType<typeof useBoard>["write"];
}) {
  const onOpenChange = (open: boolean) => {
    if (!open) close();
  };
  switch (dialog.type) {
    case "zone": {
      const guestRefusal = !board.may.editGuest
        ? "Your role may not change guest controls."
        : zone.guest.locked && !board.may.unlock
          ? `${lockSentence(zone)}.`
          : null;
      return <ZoneDialog open onOpenChange={onOpenChange} zone={zone} guestRefusal={guestRefusal} onSave={(patch) => write(writes.updateZone(zone.id, zone.name, patch))} />;
    }
    case "lock":
    case "unlock":
      return (
        <LockDialog
          open
          onOpenChange={onOpenChange}
          zone={zone}
          mode={dialog.type}
          onLock={({ reason, guestControls }) => write(writes.lock(zone.id, zone.name, board.actor.name, reason, guestControls))}
          onUnlock={({ reason }) => write(writes.unlock(zone.id, zone.name, reason))}
        />
      );
    case "source": {
      const source = dialog.cardId ? zone.sources.find((s) => s.id === dialog.cardId) : undefined;
      return (
        <SourceDialog
          open
          onOpenChange={onOpenChange}
          zone={zone}
          curves={board.curves}
          source={source}
          onSave={(values) => write(source ? writes.updateSource(zone.id, source.id, values) : writes.addSource(zone.id, values))}
          onRemove={source ? () => write(writes.removeSource(zone.id, source.id, source.label)) : undefined}
        />
      );
    }
    case "preset": {
      const preset = dialog.cardId ? zone.presets.find((p) => p.id === dialog.cardId) : undefined;
      return (
        <PresetDialog
          open
          onOpenChange={onOpenChange}
          zone={zone}
          curves={board.curves}
          preset={preset}
          onSave={(values) => {
            const { directoryId, ...form } = values;
            return write(preset ? writes.updatePreset(zone.id, preset.id, form) : writes.addPreset(zone.id, { ...form, directoryId }));
          }}
          onRemove={preset ? () => write(writes.removePreset(zone.id, preset.id, preset.name)) : undefined}
        />
      );
    }
    case "transfer": {
      const to = zoneOf(board, dialog.toZoneId);
      const preset = zone.presets.find((p) => p.id === dialog.presetId);
      if (!to || !preset) return null;
      return (
        <TransferDialog
          open
          onOpenChange={onOpenChange}
          presetName={preset.name}
          fromName={zone.name}
          toName={to.name}
          moveRefusal={transferRefusal(board, zone, to, "move")}
          copyRefusal={transferRefusal(board, zone, to, "copy")}
          onChoose={(mode) => write(writes.transferPreset({ id: zone.id, name: zone.name }, preset.id, preset.name, { id: to.id, name: to.name }, mode))}
        />
      );
    }
  }
}

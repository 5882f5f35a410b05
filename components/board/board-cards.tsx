"use client";
import { useSortable } from "@dnd-kit/sortable";
import { CSS } from "@dnd-kit/utilities";
import { createContext, memo, useContext, type ReactNode } from "react";
import { formatDb } from "@/lib/board/cautions";
import type { PresetCardDto, SourceCardDto } from "@/lib/board/types";
import { sourceKindLabels } from "@/lib/devices/model-profiles";
import { CurveIcon } from "./curve-icon";
import { accepts, dataOf, type DragData } from "./drag-model";

/** Why `over` would refuse what is being dragged (lock, slots, role), or null. */
export const DropRefusalContext = createContext<(active: DragData, over: DragData) => string | null>(() => null);

/**
 * A draggable, droppable card. The pointer can pick up the whole card; the
 * keyboard picks it up from its handle (so Enter on the Edit button edits).
 * Its content is a memoised body: while something is dragged only this thin
 * wrapper re-renders, which keeps a board of hundreds of cards smooth.
 */
export function SortableCard({
  id,
  data,
  dragDisabled,
  handleLabel,
  testId,
  children,
}: {
  id: string;
  data: DragData;
  dragDisabled: boolean;
  handleLabel: string;
  testId: string;
  children: ReactNode;
}) {
  const { attributes, listeners, setNodeRef, setActivatorNodeRef, transform, transition, isDragging, isOver, active } = useSortable({
    id,
    data,
    disabled: { draggable: dragDisabled, droppable: false },
  });
  const refusalFor = useContext(DropRefusalContext);
  const activeData = dataOf(active);
  const target = isOver && activeData && active?.id !== id && accepts(activeData, data);
  const refusal = target ? refusalFor(activeData, data) : null;
  const ring = target ? (refusal ? "ring-2 ring-danger-600" : "ring-2 ring-accent-500") : "ring-1 ring-slate-200";
  const sameList = activeData !== null && activeData.kind === data.kind && "zoneId" in activeData && "zoneId" in data && activeData.zoneId === data.zoneId;
  const hint = refusal ?? (activeData?.kind === "curve" ? "Drop to attach this curve" : sameList ? null : "Drop to move or copy here");
  return (
    <li
      ref={setNodeRef}
      style={{ transform: CSS.Translate.toString(transform), transition }}
      onPointerDown={listeners?.onPointerDown as React.PointerEventHandler | undefined}
      data-testid={testId}
      data-drop-state={target ? (refusal ? "refused" : "accepts") : undefined}
      className={`group relative rounded-md bg-white shadow-sm ${ring} ${isDragging ? "opacity-40" : ""} ${dragDisabled ? "" : "cursor-grab"} ${target ? "z-10" : ""}`}
    >
      <div className="flex items-stretch">
        {dragDisabled ? (
          <span className="w-2" />
        ) : (
          <button
            type="button"
            ref={setActivatorNodeRef}
            {...attributes}
            onKeyDown={listeners?.onKeyDown as React.KeyboardEventHandler | undefined}
            aria-label={handleLabel}
            className="flex w-6 shrink-0 items-center justify-center rounded-l-md text-slate-400 hover:bg-slate-50 hover:text-slate-700 focus-visible:outline focus-visible:outline-2 focus-visible:outline-accent-600"
          >
            <span aria-hidden="true">⠿</span>
          </button>
        )}
        {children}
      </div>
      {/* Over the card, never in its flow: a hint that changed the card's size would
          make every droppable re-measure (and every card re-render) while dragging. */}
      {target && hint ? (
        <p
          className={`pointer-events-none absolute inset-x-1 top-full z-10 mt-0.5 rounded px-2 py-0.5 text-xs shadow ${refusal ? "bg-danger-50 text-danger-700 ring-1 ring-danger-600/40" : "bg-accent-50 text-accent-700 ring-1 ring-accent-500/40"}`}
          data-testid="drop-hint"
        >
          {hint}
        </p>
      ) : null}
    </li>
  );
}

function CurveLine({ name }: { name: string | null }) {
  return name ? (
    <span className="flex min-w-0 items-center gap-1 text-slate-600">
      <CurveIcon className="text-accent-600" />
      <span className="truncate" data-testid="card-curve">{name}</span>
    </span>
  ) : (
    <span className="text-slate-500" data-testid="card-curve">no curve</span>
  );
}

function Offset({ value }: { value: number }) {
  return (
    <span className="tabular-nums font-medium" data-testid="card-offset" aria-label={`loudness offset ${formatDb(value)} dB`}>
      {formatDb(value)} dB
    </span>
  );
}

function CautionMark({ text }: { text: string | null }) {
  if (!text) return null;
  return (
    <span className="text-caution-700" title={text} data-testid="card-caution">
      <span aria-hidden="true">⚠</span>
      <span className="sr-only">{text}</span>
    </span>
  );
}

export const SourceCardBody = memo(function SourceCardBody({
  source,
  curveName,
  caution,
  canEdit,
  onEdit,
  zoneId,
}: {
  source: SourceCardDto;
  curveName: string | null;
  caution: string | null;
  canEdit: boolean;
  onEdit: (zoneId: string, sourceId: string) => void;
  zoneId: string;
}) {
  return (
    <div className="min-w-0 flex-1 px-2 py-1.5 text-sm">
      <div className="flex items-center justify-between gap-2">
        <span className={`truncate font-medium ${source.enabled ? "" : "text-slate-500 line-through"}`} data-testid="card-title">
          {source.label}
        </span>
        <span className="flex shrink-0 items-center gap-1.5">
          <CautionMark text={caution} />
          <Offset value={source.loudnessOffsetDb} />
        </span>
      </div>
      <div className="mt-0.5 flex items-center justify-between gap-2 text-xs">
        <span className="flex min-w-0 items-center gap-1.5">
          <span className="rounded bg-slate-100 px-1 text-slate-600">{sourceKindLabels[source.kind] ?? source.kind}</span>
          {source.subsonic ? <span className="rounded bg-slate-100 px-1 text-slate-600" title="Subsonic filter on">subsonic</span> : null}
          {!source.enabled ? <span className="text-slate-500">off</span> : null}
          <CurveLine name={curveName} />
        </span>
        {canEdit ? (
          <button type="button" onClick={() => onEdit(zoneId, source.id)} className="shrink-0 rounded px-1.5 text-accent-700 hover:bg-accent-50" aria-label={`Edit source ${source.label}`}>
            Edit
          </button>
        ) : null}
      </div>
    </div>
  );
});

export const PresetCardBody = memo(function PresetCardBody({
  preset,
  index,
  curveName,
  caution,
  canEdit,
  onEdit,
  zoneId,
}: {
  preset: PresetCardDto;
  index: number;
  curveName: string | null;
  caution: string | null;
  canEdit: boolean;
  onEdit: (zoneId: string, presetId: string) => void;
  zoneId: string;
}) {
  return (
    <div className="min-w-0 flex-1 px-2 py-1.5 text-sm">
      <div className="flex items-center justify-between gap-2">
        <span className="truncate font-medium" data-testid="card-title">
          <span className="mr-1 tabular-nums text-slate-500">{index + 1}.</span>
          {preset.name}
        </span>
        <span className="flex shrink-0 items-center gap-1.5">
          <CautionMark text={caution} />
          <Offset value={preset.loudnessOffsetDb} />
        </span>
      </div>
      <div className="mt-0.5 flex items-center justify-between gap-2 text-xs">
        <span className="flex min-w-0 items-center gap-1.5">
          {preset.genre ? <span className="rounded bg-slate-100 px-1 text-slate-600">{preset.genre}</span> : null}
          <CurveLine name={curveName} />
        </span>
        {canEdit ? (
          <button type="button" onClick={() => onEdit(zoneId, preset.id)} className="shrink-0 rounded px-1.5 text-accent-700 hover:bg-accent-50" aria-label={`Edit preset ${preset.name}`}>
            Edit
          </button>
        ) : null}
      </div>
    </div>
  );
});

"use client";
import { useDraggable } from "@dnd-kit/core";
import { memo } from "react";
import { chainBoostDb, formatDb } from "@/lib/board/cautions";
import type { BoardCurveDto } from "@/lib/board/types";
import { CurveIcon } from "./curve-icon";
import { dragId } from "./drag-model";

function CurveChip({ curve }: { curve: BoardCurveDto }) {
  const { attributes, listeners, setNodeRef, isDragging } = useDraggable({ id: dragId.curve(curve.id), data: { kind: "curve", id: curve.id } });
  const boost = chainBoostDb(null, curve.bands);
  return (
    <li>
      <button
        type="button"
        ref={setNodeRef}
        {...attributes}
        {...listeners}
        aria-label={`Drag tone curve ${curve.name}`}
        data-testid="tray-curve"
        title={curve.description}
        className={`cursor-grab whitespace-nowrap rounded-full bg-white px-3 py-1 text-sm ring-1 ring-slate-300 hover:ring-accent-500 focus-visible:outline focus-visible:outline-2 focus-visible:outline-accent-600 ${isDragging ? "opacity-40" : ""}`}
      >
        <CurveIcon className="mr-1.5 text-accent-600" />
        {curve.name}
        <span className="ml-1.5 text-xs text-slate-500">
          {curve.bands.length} band{curve.bands.length === 1 ? "" : "s"}{boost > 0.05 ? `, up to ${formatDb(boost)} dB` : ""}
        </span>
      </button>
    </li>
  );
}

/** The company's tone-curve library; drag a curve onto a source or preset card to attach it. */
export const CurveTray = memo(function CurveTray({ curves }: { curves: BoardCurveDto[] }) {
  // Sticky, so a curve can be dragged to a card far down a long board.
  return (
    <section aria-labelledby="curve-tray-title" className="sticky top-0 z-20 rounded-lg border border-slate-200 bg-slate-50/95 p-3 shadow-sm backdrop-blur" data-testid="curve-tray">
      <h2 id="curve-tray-title" className="text-sm font-semibold">
        Tone curves <span className="font-normal text-slate-500">— drag one onto a source or preset to attach it</span>
      </h2>
      {curves.length === 0 ? (
        <p className="mt-1 text-sm text-slate-500">The library has no tone curves yet.</p>
      ) : (
        <ul className="mt-2 flex gap-2 overflow-x-auto pb-1">
          {curves.map((c) => (
            <CurveChip key={c.id} curve={c} />
          ))}
        </ul>
      )}
    </section>
  );
});

"use client";
import {
  closestCenter,
  DndContext,
  KeyboardSensor,
  PointerSensor,
  TouchSensor,
  useSensor,
  useSensors,
  type Announcements,
  type DragEndEvent,
} from "@dnd-kit/core";
import { arrayMove, SortableContext, sortableKeyboardCoordinates, useSortable, verticalListSortingStrategy } from "@dnd-kit/sortable";
import { CSS } from "@dnd-kit/utilities";
import { useRef } from "react";

export interface Station {
  id: string;
  name: string;
  genre: string | null;
}

function SortableStation({ station, index, total, disabled }: { station: Station; index: number; total: number; disabled: boolean }) {
  const { attributes, listeners, setNodeRef, setActivatorNodeRef, transform, transition, isDragging } = useSortable({ id: station.id, disabled });
  return (
    <li
      ref={setNodeRef}
      style={{ transform: CSS.Transform.toString(transform), transition }}
      className={`flex items-center gap-3 rounded-lg border bg-white px-3 py-2 ${isDragging ? "relative z-10 border-accent-500 shadow-lg" : "border-slate-200"}`}
      data-testid="station"
      data-station-name={station.name}
    >
      <span className="w-6 shrink-0 text-right text-sm tabular-nums text-slate-500" aria-hidden="true">{index + 1}</span>
      <span className="min-w-0 flex-1">
        <span className="block truncate font-medium">{station.name}</span>
        {station.genre ? <span className="block text-xs text-slate-500">{station.genre}</span> : null}
      </span>
      {disabled ? null : (
        <button
          ref={setActivatorNodeRef}
          type="button"
          {...attributes}
          {...listeners}
          aria-label={`Move ${station.name}, number ${index + 1} of ${total}`}
          className="flex h-11 w-11 shrink-0 cursor-grab touch-none items-center justify-center rounded-md text-slate-500 hover:bg-slate-100 focus-visible:outline focus-visible:outline-2 focus-visible:outline-accent-600 active:cursor-grabbing"
          data-testid="drag-handle"
        >
          <svg aria-hidden="true" viewBox="0 0 20 20" className="h-5 w-5" fill="currentColor">
            <circle cx="7" cy="5" r="1.5" /><circle cx="13" cy="5" r="1.5" />
            <circle cx="7" cy="10" r="1.5" /><circle cx="13" cy="10" r="1.5" />
            <circle cx="7" cy="15" r="1.5" /><circle cx="13" cy="15" r="1.5" />
          </svg>
        </button>
      )}
    </li>
  );
}

/**
 * The favourite stations of one room, in order, sortable by mouse, touch and
 * keyboard (focus a handle, Space to pick up, arrow keys to move, Space to put
 * down, Escape to cancel), with what happens read out to screen readers.
 */
export function StationOrder({
  zoneId,
  zoneName,
  stations,
  disabled,
  onReorder,
}: {
  zoneId: string;
  zoneName: string;
  stations: Station[];
  disabled: boolean;
  onReorder: (next: Station[], moved: Station, to: number) => void;
}) {
  const sensors = useSensors(
    useSensor(PointerSensor, { activationConstraint: { distance: 4 } }),
    useSensor(TouchSensor, { activationConstraint: { delay: 150, tolerance: 6 } }),
    useSensor(KeyboardSensor, { coordinateGetter: sortableKeyboardCoordinates }),
  );
  const nameOf = (id: string | number) => stations.find((s) => s.id === id)?.name ?? "the station";
  const positionOf = (id: string | number) => stations.findIndex((s) => s.id === id) + 1;

  // Right after a pick-up the item is "over" itself; saying so would cut off the pick-up message.
  const justPickedUp = useRef(false);
  const announcements: Announcements = {
    onDragStart: ({ active }) => {
      justPickedUp.current = true;
      return `Picked up ${nameOf(active.id)}, number ${positionOf(active.id)} of ${stations.length}. Use the arrow keys to move it, Space to put it down, Escape to cancel.`;
    },
    onDragOver: ({ active, over }) => {
      if (justPickedUp.current && over?.id === active.id) {
        justPickedUp.current = false;
        return undefined;
      }
      justPickedUp.current = false;
      return over ? `${nameOf(active.id)} would become number ${positionOf(over.id)} of ${stations.length}.` : `${nameOf(active.id)} is outside the list.`;
    },
    onDragEnd: ({ active, over }) =>
      over ? `${nameOf(active.id)} put down as number ${positionOf(over.id)} of ${stations.length}. Saving the new order.` : `${nameOf(active.id)} put back where it was.`,
    onDragCancel: ({ active }) => `Moving cancelled. ${nameOf(active.id)} stays number ${positionOf(active.id)}.`,
  };

  function onDragEnd(event: DragEndEvent) {
    const { active, over } = event;
    if (!over || active.id === over.id) return;
    const from = stations.findIndex((s) => s.id === active.id);
    const to = stations.findIndex((s) => s.id === over.id);
    if (from < 0 || to < 0) return;
    onReorder(arrayMove(stations, from, to), stations[from], to);
  }

  return (
    <DndContext
      id={`stations-${zoneId}`}
      sensors={sensors}
      collisionDetection={closestCenter}
      onDragEnd={onDragEnd}
      accessibility={{
        announcements,
        screenReaderInstructions: {
          draggable: `To move a station of ${zoneName}, press Space, then use the up and down arrow keys, and press Space again to put it down. Escape cancels.`,
        },
      }}
    >
      <SortableContext items={stations.map((s) => s.id)} strategy={verticalListSortingStrategy}>
        <ol className="space-y-2" aria-label={`Favourite stations of ${zoneName}, in order`} data-testid="station-list">
          {stations.map((s, i) => (
            <SortableStation key={s.id} station={s} index={i} total={stations.length} disabled={disabled} />
          ))}
        </ol>
      </SortableContext>
    </DndContext>
  );
}

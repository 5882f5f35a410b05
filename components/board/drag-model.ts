import {
  closestCenter,
  pointerWithin,
  type CollisionDetection,
  type DroppableContainer,
  type KeyboardCoordinateGetter,
} from "@dnd-kit/core";
import { sortableKeyboardCoordinates, verticalListSortingStrategy, type SortingStrategy } from "@dnd-kit/sortable";

// What can be dragged on the board and where it may land:
// - a source: within its own zone's sources (reorder);
// - a stream preset: within its zone's presets (reorder), or onto another
//   zone's presets (move or copy there);
// - a tone curve from the library tray: onto any source or preset card, or
//   onto a zone's "Zone curve" line (applied to everything the zone plays).

export type DragData =
  | { kind: "source"; id: string; zoneId: string }
  | { kind: "preset"; id: string; zoneId: string }
  | { kind: "curve"; id: string }
  | { kind: "preset-list"; zoneId: string }
  | { kind: "zone-curve"; zoneId: string };

export const dragId = {
  source: (id: string) => `source:${id}`,
  preset: (id: string) => `preset:${id}`,
  curve: (id: string) => `curve:${id}`,
  presetList: (zoneId: string) => `preset-list:${zoneId}`,
  zoneCurve: (zoneId: string) => `zone-curve:${zoneId}`,
};

export function dataOf(value: { data: { current?: unknown } } | null | undefined): DragData | null {
  return (value?.data.current as DragData | undefined) ?? null;
}

/** May `over` receive `active` at all (rules like locks and slots come later, with a reason)? */
export function accepts(active: DragData | null, over: DragData | null): boolean {
  if (!active || !over) return false;
  switch (active.kind) {
    case "source":
      return over.kind === "source" && over.zoneId === active.zoneId;
    case "preset":
      return over.kind === "preset" || (over.kind === "preset-list" && over.zoneId !== active.zoneId);
    case "curve":
      return over.kind === "source" || over.kind === "preset" || over.kind === "zone-curve";
    default:
      return false;
  }
}

function acceptedBy(active: DragData | null, containers: DroppableContainer[]) {
  return containers.filter((c) => !c.disabled && accepts(active, dataOf(c)));
}

/** The zone whose column is under the pointer, from the preset lists' horizontal extents (a dozen rects, not hundreds). */
function zoneUnderPointer(args: Parameters<CollisionDetection>[0]): string | null {
  const p = args.pointerCoordinates;
  if (!p) return null;
  for (const c of args.droppableContainers) {
    const d = dataOf(c);
    if (d?.kind !== "preset-list") continue;
    const r = args.droppableRects.get(c.id);
    if (r && p.x >= r.left && p.x <= r.left + r.width) return d.zoneId;
  }
  return null;
}

const zoneIdOf = (c: DroppableContainer) => {
  const d = dataOf(c);
  return d && "zoneId" in d ? d.zoneId : null;
};

/**
 * Pointer drags: a curve lands on the card under the pointer; a preset over
 * another zone's column goes to that zone's presets (move or copy, appended),
 * otherwise it sorts within its own list. Keyboard drags (no pointer) take the
 * closest target the keyboard moved to. Rect reads are costly during a drag
 * (each one follows scroll offsets), so the pointer's column is found first.
 */
export const boardCollisions: CollisionDetection = (args) => {
  const active = dataOf(args.active);
  const candidates = acceptedBy(active, args.droppableContainers);
  if (!active || candidates.length === 0) return [];
  if (!args.pointerCoordinates) return closestCenter({ ...args, droppableContainers: candidates });
  if (active.kind === "curve") {
    const zone = zoneUnderPointer(args);
    if (!zone) return [];
    return pointerWithin({ ...args, droppableContainers: candidates.filter((c) => zoneIdOf(c) === zone) });
  }
  if (active.kind === "preset") {
    const zone = zoneUnderPointer(args);
    if (zone && zone !== active.zoneId) {
      const list = candidates.find((c) => dataOf(c)?.kind === "preset-list" && zoneIdOf(c) === zone);
      return list ? [{ id: list.id, data: { droppableContainer: list, value: 0 } }] : [];
    }
    return closestCenter({ ...args, droppableContainers: candidates.filter((c) => dataOf(c)?.kind === "preset" && zoneIdOf(c) === active.zoneId) });
  }
  return closestCenter({ ...args, droppableContainers: candidates.filter((c) => zoneIdOf(c) === (active as { zoneId?: string }).zoneId) });
};

/** Arrow keys move only between places that accept what is being dragged. */
export const boardKeyboardCoordinates: KeyboardCoordinateGetter = (event, args) => {
  const { context } = args;
  const active = dataOf(context.active);
  const all = context.droppableContainers;
  const filtered = {
    getEnabled: () => acceptedBy(active, all.getEnabled()),
    get: (id: Parameters<typeof all.get>[0]) => all.get(id),
  };
  return sortableKeyboardCoordinates(event, { ...args, context: { ...context, droppableContainers: filtered as unknown as typeof all } });
};

/**
 * Items of a list shift to make room only for an item of that same list; a
 * curve or another zone's preset passing over leaves the list still.
 */
export const listStrategy: SortingStrategy = (args) => (args.activeIndex < 0 ? null : verticalListSortingStrategy(args));

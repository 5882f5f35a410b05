import { roleLabels } from "@/lib/permissions";
import type { BoardDto, ZoneColumnDto } from "@/lib/board/types";

// The board's rules as the browser sees them, so a forbidden drop is refused
// with a reason before anything is sent. They mirror db/queries/board.ts,
// which checks everything again on the server.

export function formatWhen(iso: string | null): string {
  if (!iso) return "";
  return new Date(iso).toLocaleString("en-GB", { day: "numeric", month: "short", year: "numeric", hour: "2-digit", minute: "2-digit" });
}

export function lockSentence(zone: ZoneColumnDto): string {
  const g = zone.guest;
  const who = g.lockedByName ?? "Support";
  const when = g.lockedAt ? ` on ${formatWhen(g.lockedAt)}` : "";
  return `${who} locked “${zone.name}”${when}${g.lockReason ? `: ${g.lockReason}` : ""}`;
}

/** Why this person may not change the zone at all, or null. */
export function zoneEditRefusal(board: BoardDto, zone: ZoneColumnDto): string | null {
  if (!board.may.editZone) return `Your role (${roleLabels[board.actor.role]}) may not change zones of this home.`;
  if (zone.guest.locked && !board.may.unlock) return `${lockSentence(zone)}. Ask support or an integrator to unlock it first.`;
  return null;
}

export function presetReorderRefusal(board: BoardDto, zone: ZoneColumnDto): string | null {
  if (!board.may.reorderPresets) return `Your role (${roleLabels[board.actor.role]}) may not reorder stream presets here.`;
  if (zone.guest.locked && !board.may.unlock) return `${lockSentence(zone)}. Ask support or an integrator to unlock it first.`;
  return null;
}

export function slotsSentence(zone: ZoneColumnDto): string {
  const profile = zone.device?.profile.name;
  return `${zone.presets.length} of ${zone.presetSlots} preset slots used${profile ? ` (${profile})` : ""}`;
}

/** Why a preset may not be moved or copied from one zone to another, or null. */
export function transferRefusal(board: BoardDto, from: ZoneColumnDto, to: ZoneColumnDto, mode: "move" | "copy"): string | null {
  if (from.id === to.id) return null;
  const target = zoneEditRefusal(board, to);
  if (target) return target;
  if (mode === "move") {
    const source = zoneEditRefusal(board, from);
    if (source) return source;
  }
  if (to.presets.length + 1 > to.presetSlots) return `“${to.name}” is full: ${slotsSentence(to)}.`;
  return null;
}

function bandsOf(board: BoardDto, curveId: string | null) {
  if (!curveId) return 0;
  return board.curves.find((c) => c.id === curveId)?.bands.length ?? 0;
}

/**
 * Why a library curve may not become this zone's curve, or null. The zone curve
 * runs in series with each card's own curve, so it must fit beside the largest.
 */
export function zoneCurveRefusal(board: BoardDto, zone: ZoneColumnDto, curveId: string): string | null {
  const edit = zoneEditRefusal(board, zone);
  if (edit) return edit;
  if (zone.eqBands !== null) {
    const need = bandsOf(board, curveId);
    const cards = [...zone.sources, ...zone.presets].map((c) => bandsOf(board, c.toneCurveId));
    const most = Math.max(0, ...cards);
    if (need + most > zone.eqBands) {
      return `“${zone.name}” has ${zone.eqBands} EQ bands; a card's own curve uses ${most} and this zone curve needs ${need}.`;
    }
  }
  return null;
}

/** Why a library curve may not go onto a card of this zone, or null. */
export function curveRefusal(board: BoardDto, zone: ZoneColumnDto, curveId: string): string | null {
  const edit = zoneEditRefusal(board, zone);
  if (edit) return edit;
  if (zone.eqBands !== null) {
    const need = bandsOf(board, curveId);
    const used = bandsOf(board, zone.toneCurveId);
    if (need + used > zone.eqBands) {
      return `“${zone.name}” has ${zone.eqBands} EQ bands; its zone curve uses ${used} and this curve needs ${need}.`;
    }
  }
  return null;
}

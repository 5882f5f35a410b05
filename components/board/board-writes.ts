import { optimistic } from "@/lib/board/optimistic";
import type { BoardWriteResult } from "@/lib/board/types";
import { sendJson } from "@/lib/fetcher";
import type { GuestControlFlags, PresetForm, SourceForm, ZoneSettings } from "@/lib/validation/board";
import type { BoardWrite } from "./use-board";

// Each board action as a write: its optimistic transform and its request. The
// zone version is read when the request is sent (see use-board.ts).

const zoneUrl = (zoneId: string) => `/api/zones/${zoneId}`;

export const writes = {
  reorderSources: (zoneId: string, zoneName: string, ids: string[]): BoardWrite => ({
    label: `Reordering the sources of ${zoneName}`,
    optimistic: optimistic.reorderSources(zoneId, ids),
    send: (zone) => sendJson<BoardWriteResult>(`${zoneUrl(zoneId)}/sources/order`, "PUT", { version: zone(zoneId).version, ids }),
  }),

  reorderPresets: (zoneId: string, zoneName: string, ids: string[]): BoardWrite => ({
    label: `Reordering the stream presets of ${zoneName}`,
    optimistic: optimistic.reorderPresets(zoneId, ids),
    send: (zone) => sendJson<BoardWriteResult>(`${zoneUrl(zoneId)}/presets/order`, "PUT", { version: zone(zoneId).version, ids }),
  }),

  transferPreset: (from: { id: string; name: string }, presetId: string, presetName: string, to: { id: string; name: string }, mode: "move" | "copy"): BoardWrite => ({
    label: `${mode === "move" ? "Moving" : "Copying"} “${presetName}” to ${to.name}`,
    optimistic: optimistic.transferPreset(from.id, presetId, to.id, mode),
    send: (zone) =>
      sendJson<BoardWriteResult>(`${zoneUrl(from.id)}/presets/${presetId}/transfer`, "POST", {
        version: zone(from.id).version,
        targetZoneId: to.id,
        targetVersion: zone(to.id).version,
        mode,
      }),
  }),

  attachCurve: (
    zoneId: string,
    target: { type: "source" | "preset"; id: string; name: string } | { type: "zone"; name: string },
    curve: { id: string; name: string } | null,
  ): BoardWrite => ({
    label:
      target.type === "zone"
        ? curve
          ? `Making “${curve.name}” the zone curve of “${target.name}”`
          : `Removing the zone curve of “${target.name}”`
        : curve
          ? `Attaching “${curve.name}” to “${target.name}”`
          : `Detaching the curve from “${target.name}”`,
    optimistic: optimistic.attachCurve(zoneId, target, curve?.id ?? null),
    send: (zone) =>
      sendJson<BoardWriteResult>(`${zoneUrl(zoneId)}/attach-curve`, "PUT", {
        version: zone(zoneId).version,
        target: target.type === "zone" ? { type: "zone" } : { type: target.type, id: target.id },
        toneCurveId: curve?.id ?? null,
      }),
  }),

  addSource: (zoneId: string, input: SourceForm): BoardWrite => ({
    label: `Adding source “${input.label}”`,
    optimistic: optimistic.addSource(zoneId, input),
    send: (zone) => sendJson<BoardWriteResult>(`${zoneUrl(zoneId)}/sources`, "POST", { ...input, version: zone(zoneId).version }),
    quiet: true,
  }),

  updateSource: (zoneId: string, sourceId: string, input: SourceForm): BoardWrite => ({
    label: `Saving source “${input.label}”`,
    optimistic: optimistic.updateSource(zoneId, sourceId, input),
    send: (zone) => sendJson<BoardWriteResult>(`${zoneUrl(zoneId)}/sources/${sourceId}`, "PATCH", { ...input, version: zone(zoneId).version }),
    quiet: true,
  }),

  removeSource: (zoneId: string, sourceId: string, label: string): BoardWrite => ({
    label: `Removing source “${label}”`,
    optimistic: optimistic.removeSource(zoneId, sourceId),
    send: (zone) => sendJson<BoardWriteResult>(`${zoneUrl(zoneId)}/sources/${sourceId}?version=${zone(zoneId).version}`, "DELETE"),
    quiet: true,
  }),

  addPreset: (zoneId: string, input: PresetForm & { directoryId: string | null }): BoardWrite => ({
    label: `Adding stream preset “${input.name}”`,
    optimistic: optimistic.addPreset(zoneId, input),
    send: (zone) => sendJson<BoardWriteResult>(`${zoneUrl(zoneId)}/presets`, "POST", { ...input, version: zone(zoneId).version }),
    quiet: true,
  }),

  updatePreset: (zoneId: string, presetId: string, input: PresetForm): BoardWrite => ({
    label: `Saving stream preset “${input.name}”`,
    optimistic: optimistic.updatePreset(zoneId, presetId, input),
    send: (zone) => sendJson<BoardWriteResult>(`${zoneUrl(zoneId)}/presets/${presetId}`, "PATCH", { ...input, version: zone(zoneId).version }),
    quiet: true,
  }),

  removePreset: (zoneId: string, presetId: string, name: string): BoardWrite => ({
    label: `Removing stream preset “${name}”`,
    optimistic: optimistic.removePreset(zoneId, presetId),
    send: (zone) => sendJson<BoardWriteResult>(`${zoneUrl(zoneId)}/presets/${presetId}?version=${zone(zoneId).version}`, "DELETE"),
    quiet: true,
  }),

  updateZone: (zoneId: string, zoneName: string, patch: Partial<ZoneSettings>): BoardWrite => ({
    label: `Saving zone “${zoneName}”`,
    optimistic: optimistic.updateZone(zoneId, patch),
    send: (zone) => sendJson<BoardWriteResult>(`${zoneUrl(zoneId)}/settings`, "PATCH", { ...patch, version: zone(zoneId).version }),
    quiet: true,
  }),

  lock: (zoneId: string, zoneName: string, byName: string, reason: string, guestControls: GuestControlFlags): BoardWrite => ({
    label: `Locking the guest controls of ${zoneName}`,
    optimistic: optimistic.lock(zoneId, byName, reason, guestControls),
    send: (zone) => sendJson<BoardWriteResult>(`${zoneUrl(zoneId)}/guest-lock`, "POST", { version: zone(zoneId).version, reason, guestControls }),
    quiet: true,
  }),

  unlock: (zoneId: string, zoneName: string, reason: string): BoardWrite => ({
    label: `Unlocking the guest controls of ${zoneName}`,
    optimistic: optimistic.unlock(zoneId),
    send: (zone) => sendJson<BoardWriteResult>(`${zoneUrl(zoneId)}/guest-lock`, "DELETE", { version: zone(zoneId).version, reason }),
    quiet: true,
  }),
};

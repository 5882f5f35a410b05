import "server-only";
import { and, asc, desc, eq, inArray, isNull } from "drizzle-orm";
import { db } from "@/db/client";
import { homes, pushTargets, sources, streamPresets, zones } from "@/db/schema";
import { applyListOrder, changeZone } from "@/db/queries/zone-writes";
import { startPush } from "@/lib/fleet/push-service";
import { sourceKindLabels, type SourceKind } from "@/lib/devices/model-profiles";
import { AppError } from "@/lib/errors";
import { type Actor, can } from "@/lib/permissions";

// The household's read-only view of their own home(s), in plain words, and the
// one change a household makes: the order of their favourite stations. What a
// homeowner receives here is deliberately narrow — no device, model, serial,
// offsets, curves, outputs or template: nothing they have no use for.

export interface HouseholdZoneDto {
  id: string;
  name: string;
  version: number;
  volumeCeiling: number;
  turnOnVolume: number;
  guestControls: { volume: boolean; source: boolean; wake: boolean; locked: boolean };
  sources: { id: string; label: string; kind: string }[];
  presets: { id: string; name: string; genre: string | null }[];
  /** Whether the zone's system has the current settings, in the household's words. */
  delivery: DeliveryDto;
}

export interface HouseholdHomeDto {
  id: string;
  name: string;
  city: string;
  zones: HouseholdZoneDto[];
}

export interface HouseholdViewDto {
  company: string;
  homes: HouseholdHomeDto[];
}

export type DeliveryState = "delivered" | "sending" | "waiting" | "failed" | "no-system";

export interface DeliveryDto {
  state: DeliveryState;
  text: string;
  at: string | null;
}

const deliveryText: Record<DeliveryState, string> = {
  delivered: "Your system has these settings.",
  sending: "Sending to your system…",
  waiting: "Saved — will be sent to your system with the next push.",
  failed: "Saved, but your system could not be reached yet. Your integrator can see this and will send it again.",
  "no-system": "Saved. This room has no system connected yet.",
};

export function toDelivery(state: DeliveryState, at: Date | null = null): DeliveryDto {
  return { state, text: deliveryText[state], at: at?.toISOString() ?? null };
}

function requireHousehold(actor: Actor) {
  if (actor.role !== "homeowner") throw new AppError("auth:forbidden", { message: "This view is for households." });
}

/**
 * Delivery of each zone's current revision, from its push targets: applied,
 * still on its way, failed, or not yet part of any push.
 */
async function deliveries(zoneRows: { id: string; deviceId: string | null; currentRevisionId: string | null }[]) {
  const out = new Map<string, DeliveryDto>();
  const withRevision = zoneRows.filter((z) => z.deviceId && z.currentRevisionId);
  const targets = withRevision.length
    ? await db
        .select({ zoneId: pushTargets.zoneId, revisionId: pushTargets.revisionId, state: pushTargets.state, updatedAt: pushTargets.updatedAt })
        .from(pushTargets)
        .where(
          and(
            inArray(pushTargets.zoneId, withRevision.map((z) => z.id)),
            inArray(pushTargets.revisionId, withRevision.map((z) => z.currentRevisionId!)),
          ),
        )
        .orderBy(desc(pushTargets.updatedAt))
    : [];
  for (const z of zoneRows) {
    if (!z.deviceId) {
      out.set(z.id, toDelivery("no-system"));
      continue;
    }
    const mine = targets.filter((t) => t.zoneId === z.id && t.revisionId === z.currentRevisionId);
    const applied = mine.find((t) => t.state === "applied");
    const moving = mine.find((t) => ["queued", "sending", "awaiting_report"].includes(t.state));
    const failed = mine.find((t) => t.state === "failed");
    if (applied) out.set(z.id, toDelivery("delivered", applied.updatedAt));
    else if (moving) out.set(z.id, toDelivery("sending", moving.updatedAt));
    else if (failed) out.set(z.id, toDelivery("failed", failed.updatedAt));
    else out.set(z.id, toDelivery("waiting"));
  }
  return out;
}

async function householdZones(actor: Actor, homeIds: string[]): Promise<(HouseholdZoneDto & { homeId: string })[]> {
  if (homeIds.length === 0) return [];
  const rows = await db
    .select({
      id: zones.id,
      homeId: zones.homeId,
      name: zones.name,
      version: zones.version,
      volumeCeiling: zones.volumeCeiling,
      turnOnVolume: zones.turnOnVolume,
      guestVolume: zones.guestVolume,
      guestSource: zones.guestSource,
      guestWake: zones.guestWake,
      guestLocked: zones.guestLocked,
      deviceId: zones.deviceId,
      currentRevisionId: zones.currentRevisionId,
    })
    .from(zones)
    .where(and(inArray(zones.homeId, homeIds), eq(zones.organizationId, actor.organizationId), isNull(zones.deletedAt)))
    .orderBy(asc(zones.position), asc(zones.name));
  const ids = rows.map((r) => r.id);
  const [sourceRows, presetRows, delivered] = await Promise.all([
    ids.length
      ? db
          .select({ id: sources.id, zoneId: sources.zoneId, label: sources.label, kind: sources.kind })
          .from(sources)
          .where(and(inArray(sources.zoneId, ids), eq(sources.enabled, true)))
          .orderBy(asc(sources.position))
      : Promise.resolve([]),
    ids.length
      ? db
          .select({ id: streamPresets.id, zoneId: streamPresets.zoneId, name: streamPresets.name, genre: streamPresets.genre })
          .from(streamPresets)
          .where(inArray(streamPresets.zoneId, ids))
          .orderBy(asc(streamPresets.position), asc(streamPresets.id))
      : Promise.resolve([]),
    deliveries(rows),
  ]);
  return rows.map((r) => ({
    id: r.id,
    homeId: r.homeId,
    name: r.name,
    version: r.version,
    volumeCeiling: r.volumeCeiling,
    turnOnVolume: r.turnOnVolume,
    guestControls: { volume: r.guestVolume, source: r.guestSource, wake: r.guestWake, locked: r.guestLocked },
    sources: sourceRows
      .filter((s) => s.zoneId === r.id)
      .map((s) => ({ id: s.id, label: s.label, kind: sourceKindLabels[s.kind as SourceKind] ?? s.kind })),
    presets: presetRows.filter((p) => p.zoneId === r.id).map(({ id, name, genre }) => ({ id, name, genre })),
    delivery: delivered.get(r.id)!,
  }));
}

export async function getHouseholdView({ actor }: { actor: Actor }): Promise<HouseholdViewDto> {
  requireHousehold(actor);
  const homeIds = actor.householdHomeIds;
  if (homeIds.length === 0) return { company: actor.organizationName, homes: [] };
  const homeRows = await db
    .select({ id: homes.id, name: homes.name, city: homes.city })
    .from(homes)
    .where(and(eq(homes.organizationId, actor.organizationId), inArray(homes.id, homeIds)))
    .orderBy(asc(homes.name));
  const zoneList = await householdZones(
    actor,
    homeRows.map((h) => h.id),
  );
  return {
    company: actor.organizationName,
    homes: homeRows.map((h) => ({
      ...h,
      zones: zoneList.filter((z) => z.homeId === h.id).map(({ homeId: _homeId, ...z }) => z),
    })),
  };
}

export async function getHouseholdZone({ actor, zoneId }: { actor: Actor; zoneId: string }): Promise<HouseholdZoneDto> {
  requireHousehold(actor);
  const [row] = await db
    .select({ homeId: zones.homeId, organizationId: zones.organizationId })
    .from(zones)
    .where(and(eq(zones.id, zoneId), eq(zones.organizationId, actor.organizationId), isNull(zones.deletedAt)));
  if (!row || !can(actor, "zone:read", { id: row.homeId, organizationId: row.organizationId })) throw new AppError("zone:not-found");
  const [zone] = (await householdZones(actor, [row.homeId])).filter((z) => z.id === zoneId);
  const { homeId: _homeId, ...dto } = zone;
  return dto;
}

export interface HouseholdPushRequest {
  /** "started": a push was queued; "saved": nothing sent yet, the next push carries it. */
  outcome: "started" | "saved" | "no-system" | "unchanged";
  pushId: string | null;
  delivery: DeliveryDto;
}

/**
 * Send the household's change to their system: a push of this one zone's
 * current revision through the fleet push service (durable jobs; the worker
 * sends it and follows the device's report). Nothing here claims the system
 * has it: the answer is "sending" (or, when no push could start, "saved — the
 * next push carries it"), and the view follows the push target's real state.
 */
export async function requestHouseholdPush({
  actor,
  homeId,
  zoneId,
  revisionId,
  hasSystem,
}: {
  actor: Actor;
  homeId: string;
  zoneId: string;
  revisionId: string;
  hasSystem: boolean;
}): Promise<HouseholdPushRequest> {
  if (!hasSystem) return { outcome: "no-system", pushId: null, delivery: toDelivery("no-system") };
  try {
    const started = await startPush({
      actor,
      scope: { kind: "household", homeId, zoneIds: [zoneId] },
      expectedRevisions: { [zoneId]: revisionId },
      note: "favourite stations reordered by the household",
    });
    return { outcome: "started", pushId: started.pushId, delivery: toDelivery("sending") };
  } catch (error) {
    // The order is saved either way; a push that could not start now (one already under
    // way, a newer change, the queue unreachable) leaves it for the next push.
    if (!(error instanceof AppError)) console.error("[household] push could not start", error);
    return { outcome: "saved", pushId: null, delivery: toDelivery("waiting") };
  }
}

export interface HouseholdReorderResult {
  zone: HouseholdZoneDto;
  revision: { number: number; created: boolean };
  push: HouseholdPushRequest;
}

/** The household puts their favourite stations in a new order: a new revision, then a push. */
export async function reorderHouseholdPresets({
  actor,
  zoneId,
  version,
  presetIds,
}: {
  actor: Actor;
  zoneId: string;
  version: number;
  presetIds: string[];
}): Promise<HouseholdReorderResult> {
  requireHousehold(actor);
  let hasSystem = false;
  let homeId = "";
  const result = await changeZone({
    actor,
    zoneId,
    expectedVersion: version,
    action: "preset:reorder",
    kind: "household.presets.reordered",
    summary: (zone) => `${actor.name} put the favourite stations of “${zone.name}” in a new order`,
    message: "Favourite stations reordered by the household",
    apply: async (tx, zone) => {
      if (zone.guestLocked && !can(actor, "guest:unlock", { id: zone.homeId, organizationId: zone.organizationId })) {
        throw new AppError("zone:locked", {
          message: "Your integrator’s support team has locked this room’s settings for now, so the order cannot change. Ask them if you need it changed.",
        });
      }
      hasSystem = zone.deviceId !== null;
      homeId = zone.homeId;
      const current = await tx
        .select({ id: streamPresets.id, name: streamPresets.name })
        .from(streamPresets)
        .where(eq(streamPresets.zoneId, zone.id))
        .orderBy(asc(streamPresets.position), asc(streamPresets.id));
      const known = new Set(current.map((p) => p.id));
      if (presetIds.length !== current.length || new Set(presetIds).size !== presetIds.length || presetIds.some((id) => !known.has(id))) {
        throw new AppError("zone:rule", {
          message: "The list of stations changed while you were sorting it. Reload the page and try again.",
          fieldErrors: { presetIds: ["Must name each of this room’s stations once."] },
        });
      }
      // A zone made from a template keeps the household's order when the template
      // changes: changeZone records "presets.order" among its overrides.
      await applyListOrder(tx, "stream_presets", zone.id, presetIds);
      const name = new Map(current.map((p) => [p.id, p.name]));
      return [{ field: "Favourite stations · order", before: current.map((p) => p.name), after: presetIds.map((id) => name.get(id)) }];
    },
  });
  // The same order again makes no new revision, so there is nothing new to send.
  const push: HouseholdPushRequest = result.revision.created
    ? await requestHouseholdPush({ actor, homeId, zoneId, revisionId: result.revision.id, hasSystem })
    : { outcome: "unchanged", pushId: null, delivery: (await getHouseholdZone({ actor, zoneId })).delivery };
  // Read after the push started, so the delivery shown is the push target's own state.
  const zone = await getHouseholdZone({ actor, zoneId });
  return { zone, revision: { number: result.revision.number, created: result.revision.created }, push };
}

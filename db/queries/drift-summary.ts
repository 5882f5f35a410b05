import "server-only";
import { and, eq, inArray, isNull, sql } from "drizzle-orm";
import { db } from "@/db/client";
import { devices, zoneRevisions, zones } from "@/db/schema";
import { normalizeConfig, type DriftState } from "@/lib/fleet/drift";
import { contentHash } from "@/lib/zones/content-hash";

// Drift counts per home for the homes table, kept apart from the device module
// so the homes list does not load the push machinery.

export type DriftCounts = Record<DriftState, number>;

/**
 * Per home, how many zones are in each drift state — for the homes table. Cheap:
 * compares content hashes (both sides normalised) instead of diffing.
 */
export async function driftSummaryForHomes(homeIds: string[]): Promise<Map<string, DriftCounts>> {
  const out = new Map<string, DriftCounts>();
  if (homeIds.length === 0) return out;
  const rows = await db
    .select({
      homeId: zones.homeId,
      desired: zoneRevisions.config,
      deviceId: devices.id,
      online: devices.online,
      reportedConfig: devices.reportedConfig,
      reportedVersion: devices.reportedVersion,
      desiredVersion: devices.desiredVersion,
      inFlight: sql<boolean>`exists (select 1 from push_targets t where t.zone_id = "zones"."id" and t.state in ('queued','sending','awaiting_report'))`,
    })
    .from(zones)
    .leftJoin(zoneRevisions, eq(zoneRevisions.id, zones.currentRevisionId))
    .leftJoin(devices, eq(devices.id, zones.deviceId))
    .where(and(inArray(zones.homeId, homeIds), isNull(zones.deletedAt)));
  for (const r of rows) {
    let state: DriftState;
    if (!r.deviceId) state = "no_device";
    else if (!r.online) state = "offline";
    else if (r.inFlight || r.desiredVersion! > r.reportedVersion!) state = "pending";
    else if (!r.reportedConfig || !r.desired) state = "never_reported";
    else state = contentHash(normalizeConfig(r.desired)) === contentHash(normalizeConfig(r.reportedConfig)) ? "in_sync" : "drifted";
    const counts = out.get(r.homeId) ?? { in_sync: 0, pending: 0, drifted: 0, offline: 0, never_reported: 0, no_device: 0 };
    counts[state] += 1;
    out.set(r.homeId, counts);
  }
  return out;
}


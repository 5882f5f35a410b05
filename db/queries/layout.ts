import "server-only";
import { eq } from "drizzle-orm";
import { db } from "@/db/client";
import { devices, homes, modelProfiles, zones, type Zone } from "@/db/schema";
import type { FieldChange } from "@/db/queries/audit";
import { changeZone, loadCurvesForConfig, loadZoneForActor } from "@/db/queries/zone-writes";
import { AppError } from "@/lib/errors";
import { type Actor, can } from "@/lib/permissions";
import { layoutDeviceProblems, type LayoutInput, type LayoutProfile } from "@/lib/validation/layout";
import type { ConfigBand, OutputLayout } from "@/lib/validation/zone-config";
import { canonicalJson } from "@/lib/zones/content-hash";

// A zone's output layout: outputs (main pair, subwoofers, line out), the
// crossover, distances, latencies, trims and polarity. Read with the device's
// limits and the zone's tone curve (for the summed-response plot); saved
// through changeZone (version check, revision, audit).

export interface LayoutDto {
  zone: { id: string; name: string; version: number; homeId: string; homeName: string; locked: boolean };
  layout: OutputLayout;
  /** The zone device's model profile; null when no device is bound. */
  profile: (LayoutProfile & { id: string }) | null;
  zoneCurve: { id: string; name: string; bands: ConfigBand[] } | null;
  may: { edit: boolean };
}

async function profileOf(zone: Zone) {
  if (!zone.deviceId) return null;
  const [row] = await db
    .select({ id: modelProfiles.id, name: modelProfiles.name, subwooferOutputs: modelProfiles.subwooferOutputs, hasLineOut: modelProfiles.hasLineOut })
    .from(devices)
    .innerJoin(modelProfiles, eq(modelProfiles.id, devices.modelProfileId))
    .where(eq(devices.id, zone.deviceId));
  return row ?? null;
}

export async function getLayout({ actor, zoneId }: { actor: Actor; zoneId: string }): Promise<LayoutDto> {
  const zone = await loadZoneForActor({ actor, zoneId });
  const [[home], profile, curves] = await Promise.all([
    db.select({ name: homes.name }).from(homes).where(eq(homes.id, zone.homeId)),
    profileOf(zone),
    loadCurvesForConfig(db, zone.toneCurveId ? [zone.toneCurveId] : []),
  ]);
  const curve = zone.toneCurveId ? curves.get(zone.toneCurveId) : undefined;
  const ref = { id: zone.homeId, organizationId: zone.organizationId };
  return {
    zone: { id: zone.id, name: zone.name, version: zone.version, homeId: zone.homeId, homeName: home?.name ?? "", locked: zone.guestLocked },
    layout: zone.outputLayout,
    profile,
    zoneCurve: curve ? { id: curve.id, name: curve.name, bands: curve.bands } : null,
    may: { edit: can(actor, "zone:edit", ref) && (!zone.guestLocked || can(actor, "guest:unlock", ref)) },
  };
}

function describe(o: OutputLayout["outputs"][number]) {
  return `${o.label} (${o.role}) ${o.distance.value} ${o.distance.unit}, ${o.latencyMs} ms, ${o.trimDb} dB${o.polarityInverted ? ", inverted" : ""}`;
}

/** Field-by-field audit entries for a layout change. */
function layoutChanges(before: OutputLayout, after: OutputLayout): FieldChange[] {
  const changes: FieldChange[] = [];
  if (canonicalJson(before.crossover) !== canonicalJson(after.crossover)) {
    changes.push({ field: "outputLayout.crossover", before: before.crossover, after: after.crossover });
  }
  const b = new Map(before.outputs.map((o) => [o.id, o]));
  const a = new Map(after.outputs.map((o) => [o.id, o]));
  for (const [id, o] of a) {
    const old = b.get(id);
    if (!old) changes.push({ field: `outputLayout.outputs.${id}`, before: null, after: describe(o) });
    else if (JSON.stringify(old) !== JSON.stringify(o)) changes.push({ field: `outputLayout.outputs.${id}`, before: describe(old), after: describe(o) });
  }
  for (const [id, o] of b) if (!a.has(id)) changes.push({ field: `outputLayout.outputs.${id}`, before: describe(o), after: null });
  return changes;
}

export async function saveLayout({ actor, zoneId, version, layout }: { actor: Actor; zoneId: string; version: number; layout: LayoutInput }) {
  const result = await changeZone({
    actor,
    zoneId,
    expectedVersion: version,
    action: "zone:edit",
    kind: "zone.layout.updated",
    summary: (zone) => `Updated the output layout of “${zone.name}”`,
    message: "Output layout",
    apply: async (tx, zone) => {
      if (zone.guestLocked && !can(actor, "guest:unlock", { id: zone.homeId, organizationId: zone.organizationId })) {
        throw new AppError("zone:locked", {
          message: `Support locked “${zone.name}”${zone.lockReason ? `: ${zone.lockReason}` : ""}. Ask support or an integrator to unlock it first.`,
        });
      }
      const stored: OutputLayout = {
        crossover: layout.crossover,
        outputs: layout.outputs.map((o) => ({ ...o, distance: { ...o.distance } })),
      };
      const problems = layoutDeviceProblems(stored, await profileOf(zone));
      if (Object.keys(problems).length > 0) {
        throw new AppError("zone:rule", { message: Object.values(problems).flat().join(" "), fieldErrors: problems });
      }
      const changes = layoutChanges(zone.outputLayout, stored);
      if (changes.length > 0) await tx.update(zones).set({ outputLayout: stored, updatedAt: new Date() }).where(eq(zones.id, zone.id));
      return changes;
    },
  });
  return { zoneId: result.zoneId, version: result.version, revision: { number: result.revision.number, created: result.revision.created }, changes: result.changes };
}

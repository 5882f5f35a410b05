import { eq } from "drizzle-orm";
import { loadActor } from "@/db/queries/actors";
import { changeZone } from "@/db/queries/zone-writes";
import { sources, streamPresets, zones } from "@/db/schema";
import type { Actor } from "@/lib/permissions";
import { query } from "./database";

// Helpers for the history and backup integration tests: real actors, real
// zone changes through changeZone, and a fingerprint of everything a refused
// write must leave alone.

export async function actorFor(email: string): Promise<Actor> {
  const [row] = await query<{ id: string }>("select id from public.user where email = $1", [email]);
  const actor = await loadActor({ userId: row.id, activeOrganizationId: null });
  if (!actor) throw new Error(`no actor for ${email}`);
  return actor;
}

export async function zoneIn(homeName: string, zoneName: string) {
  const [row] = await query<{ id: string; version: number; home_id: string; current_revision_id: string }>(
    "select z.id, z.version, z.home_id, z.current_revision_id from zones z join homes h on h.id = z.home_id where h.name = $1 and z.name = $2",
    [homeName, zoneName],
  );
  if (!row) throw new Error(`no zone ${homeName} / ${zoneName}`);
  return { id: row.id, version: row.version, homeId: row.home_id, currentRevisionId: row.current_revision_id };
}

export async function homeId(name: string) {
  const [row] = await query<{ id: string }>("select id from homes where name = $1", [name]);
  return row.id;
}

export async function versionOf(zoneId: string) {
  const [row] = await query<{ version: number }>("select version from zones where id = $1", [zoneId]);
  return row.version;
}

/** Change a zone the way the product does (changeZone: version, revision, audit). */
export async function editZone(
  actor: Actor,
  zoneId: string,
  edit: { volumeCeiling?: number; turnOnVolume?: number; sourceOffset?: { label: string; db: number }; dropPresets?: boolean; dropSources?: boolean; detachCurves?: boolean },
  kind = "zone.settings-updated",
) {
  return changeZone({
    actor,
    zoneId,
    expectedVersion: await versionOf(zoneId),
    action: "zone:edit",
    kind,
    summary: "Test edit",
    apply: async (tx) => {
      const set: Partial<typeof zones.$inferInsert> = {};
      if (edit.volumeCeiling !== undefined) set.volumeCeiling = edit.volumeCeiling;
      if (edit.turnOnVolume !== undefined) set.turnOnVolume = edit.turnOnVolume;
      if (edit.detachCurves) set.toneCurveId = null;
      if (Object.keys(set).length) await tx.update(zones).set(set).where(eq(zones.id, zoneId));
      if (edit.sourceOffset) {
        const rows = await tx.select().from(sources).where(eq(sources.zoneId, zoneId));
        const s = rows.find((r) => r.label === edit.sourceOffset!.label)!;
        await tx.update(sources).set({ loudnessOffsetDb: edit.sourceOffset.db }).where(eq(sources.id, s.id));
      }
      if (edit.dropPresets) await tx.delete(streamPresets).where(eq(streamPresets.zoneId, zoneId));
      if (edit.dropSources) await tx.delete(sources).where(eq(sources.zoneId, zoneId));
      return [{ field: "test", before: null, after: edit }];
    },
  });
}

/** Counts and versions across every table a restore could write. */
export async function fingerprint() {
  const [counts] = await query(
    `select (select count(*)::int from audit_events) as audit,
            (select count(*)::int from zone_revisions) as revisions,
            (select count(*)::int from zones) as zones,
            (select count(*)::int from sources) as sources,
            (select count(*)::int from stream_presets) as presets,
            (select count(*)::int from tone_curves) as curves,
            (select count(*)::int from zone_templates) as templates`,
  );
  const zoneRows = await query("select id, version, name, volume_ceiling, deleted_at, device_id, tone_curve_id from zones order by id");
  const homeRows = await query("select id, version, name, city, notes from homes order by id");
  const sourceRows = await query("select id, zone_id, position, label, kind, loudness_offset_db, tone_curve_id from sources order by id");
  return JSON.stringify({ counts, zoneRows, homeRows, sourceRows });
}

/** A request with any body and headers, to a route handler, as Next.js calls it. */
export async function sendRaw(
  handler: (request: Request, context: { params: Promise<Record<string, string>> }) => Promise<Response>,
  options: { method?: string; path: string; params?: Record<string, string>; cookie?: string; body?: BodyInit | null; headers?: Record<string, string> },
) {
  const headers = new Headers({ accept: "application/json", ...options.headers });
  if (options.cookie) headers.set("cookie", options.cookie);
  const init: RequestInit & { duplex?: "half" } = { method: options.method ?? "POST", headers, body: options.body ?? null };
  if (options.body instanceof ReadableStream) init.duplex = "half";
  const response = await handler(new Request(`http://localhost:3000${options.path}`, init), { params: Promise.resolve(options.params ?? {}) });
  const text = await response.text();
  let json: unknown = null;
  try {
    json = text ? JSON.parse(text) : null;
  } catch {
    json = text;
  }
  return {
    status: response.status,
    headers: response.headers,
    text,
    json: json as Record<string, unknown> & { error?: { code: string; message: string; fieldErrors?: Record<string, string[]> } },
  };
}

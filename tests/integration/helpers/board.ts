import { query } from "./database";
import { callRoute, signInAs } from "./http";

// Small helpers for the zone-board integration tests: find demo rows by name,
// read a zone's version and audit trail straight from the database.

export async function homeIdByName(name: string) {
  const [row] = await query<{ id: string }>("select id from homes where name = $1", [name]);
  if (!row) throw new Error(`no home ${name}`);
  return row.id;
}

export async function zoneByName(homeName: string, zoneName: string) {
  const [row] = await query<{ id: string; version: number; home_id: string }>(
    "select z.id, z.version, z.home_id from zones z join homes h on h.id = z.home_id where h.name = $1 and z.name = $2",
    [homeName, zoneName],
  );
  if (!row) throw new Error(`no zone ${homeName} / ${zoneName}`);
  return { id: row.id, version: row.version, homeId: row.home_id };
}

export async function zoneVersion(zoneId: string) {
  const [row] = await query<{ version: number }>("select version from zones where id = $1", [zoneId]);
  return row.version;
}

export async function presetsOf(zoneId: string) {
  return query<{ id: string; name: string; position: number; tone_curve_id: string | null; loudness_offset_db: number }>(
    "select id, name, position, tone_curve_id, loudness_offset_db from stream_presets where zone_id = $1 order by position",
    [zoneId],
  );
}

export async function sourcesOf(zoneId: string) {
  return query<{ id: string; label: string; position: number; kind: string; tone_curve_id: string | null; loudness_offset_db: number; subsonic: boolean; enabled: boolean }>(
    "select id, label, position, kind, tone_curve_id, loudness_offset_db, subsonic, enabled from sources where zone_id = $1 order by position",
    [zoneId],
  );
}

export async function curveIdByName(name: string) {
  const [row] = await query<{ id: string }>("select id from tone_curves where name = $1", [name]);
  if (!row) throw new Error(`no curve ${name}`);
  return row.id;
}

export async function auditCount(zoneId: string) {
  const [row] = await query<{ n: number }>("select count(*)::int as n from audit_events where zone_id = $1", [zoneId]);
  return row.n;
}

export async function revisionCount(zoneId: string) {
  const [row] = await query<{ n: number }>("select count(*)::int as n from zone_revisions where zone_id = $1", [zoneId]);
  return row.n;
}

/** Everything a refused write must leave alone. */
export async function zoneFingerprint(zoneId: string) {
  const [zone] = await query("select * from zones where id = $1", [zoneId]);
  return JSON.stringify({
    zone,
    sources: await sourcesOf(zoneId),
    presets: await presetsOf(zoneId),
    audits: await auditCount(zoneId),
    revisions: await revisionCount(zoneId),
  });
}

type RouteFn = Parameters<typeof callRoute>[0];

/** Call a route as one of the demo people. */
export async function as(
  email: string,
  handler: RouteFn,
  options: { method?: string; path: string; params?: Record<string, string>; body?: unknown; headers?: Record<string, string> },
) {
  return callRoute(handler, { ...options, cookie: await signInAs(email) });
}

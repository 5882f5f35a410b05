import { beforeAll, describe, expect, it } from "vitest";
import { GET as listRoute } from "@/app/api/zones/[zoneId]/revisions/route";
import { GET as getRoute } from "@/app/api/zones/[zoneId]/revisions/[revisionId]/route";
import { GET as compareRoute } from "@/app/api/zones/[zoneId]/revisions/compare/route";
import { POST as restoreRoute } from "@/app/api/zones/[zoneId]/revisions/[revisionId]/restore/route";
import { DELETE as deleteRoute } from "@/app/api/zones/[zoneId]/route";
import { contentHash } from "@/lib/zones/content-hash";
import type { ZoneConfig } from "@/lib/validation/zone-config";
import { query } from "./helpers/database";
import { actorFor, editZone, fingerprint, versionOf, zoneIn } from "./helpers/history";
import { callRoute, people, signInAs } from "./helpers/http";

type Revision = { id: string; number: number; contentHash: string; current: boolean; summary: string; authorName: string | null; message: string | null };

async function revisions(zoneId: string, cookie: string, qs = "") {
  const res = await callRoute(listRoute, { path: `/api/zones/${zoneId}/revisions${qs}`, params: { zoneId }, cookie });
  return res as typeof res & { json: { items: Revision[]; total: number; zone: { version: number; deletedAt: string | null; canRestore: boolean } } };
}

async function restore(zoneId: string, revisionId: string, cookie: string, body: unknown) {
  return callRoute(restoreRoute, {
    method: "POST",
    path: `/api/zones/${zoneId}/revisions/${revisionId}/restore`,
    params: { zoneId, revisionId },
    cookie,
    body,
  });
}

describe("zone revisions: list, read, compare", () => {
  let zone: Awaited<ReturnType<typeof zoneIn>>;

  beforeAll(async () => {
    zone = await zoneIn("Lindqvist residence", "Family room");
    const theo = await actorFor(people.integrator);
    await editZone(theo, zone.id, { volumeCeiling: 68, sourceOffset: { label: "TV", db: -2.5 } });
  });

  it("lists revisions newest first, each with what changed since the one before", async () => {
    const res = await revisions(zone.id, await signInAs(people.support));
    expect(res.status).toBe(200);
    expect(res.json.total).toBe(2);
    const [second, first] = res.json.items;
    expect(second).toMatchObject({ number: 2, current: true, authorName: "Theo Banerjee", summary: "2 changes: zone, sources" });
    expect(first).toMatchObject({ number: 1, current: false, summary: "First revision", message: "Configuration at hand-over" });
  });

  it("reads one revision with its whole configuration, tone curves resolved to band values", async () => {
    const cookie = await signInAs(people.integrator);
    const list = await revisions(zone.id, cookie);
    const first = list.json.items[1];
    const res = await callRoute(getRoute, { path: `/api/zones/${zone.id}/revisions/${first.id}`, params: { zoneId: zone.id, revisionId: first.id }, cookie });
    expect(res.status).toBe(200);
    const config = (res.json.revision as { config: ZoneConfig }).config;
    expect(config.volumeCeiling).toBe(75);
    const tv = config.sources.find((s) => s.label === "TV")!;
    expect(tv.loudnessOffsetDb).toBe(-4);
    expect(tv.toneCurve?.bands.length).toBe(2);
    // The stored hash is the hash of the stored content (lib/zones/content-hash.ts).
    expect(contentHash(config)).toBe(first.contentHash);
  });

  it("compares two revisions field by field in readable words", async () => {
    const cookie = await signInAs(people.installer);
    const list = await revisions(zone.id, cookie);
    const [to, from] = list.json.items;
    const res = await callRoute(compareRoute, {
      path: `/api/zones/${zone.id}/revisions/compare?from=${from.id}&to=current`,
      params: { zoneId: zone.id },
      cookie,
    });
    expect(res.status).toBe(200);
    const diff = res.json.diff as { changes: { text: string; path: string }[] };
    expect(diff.changes.map((c) => c.text)).toEqual(["Zone: volume ceiling 75 % → 68 %", "Source “TV”: loudness offset \u22124 dB → \u22122.5 dB"]);
    expect((res.json.to as { id: string }).id).toBe(to.id);
  });

  it("refuses malformed ids and unknown revisions clearly", async () => {
    const cookie = await signInAs(people.integrator);
    const bad = await callRoute(compareRoute, { path: `/api/zones/${zone.id}/revisions/compare?from=nope&to=current`, params: { zoneId: zone.id }, cookie });
    expect(bad.status).toBe(400);
    expect(bad.json.error?.fieldErrors).toHaveProperty("from");
    const unknown = "00000000-0000-4000-8000-000000000000";
    const missing = await callRoute(getRoute, { path: `/api/zones/${zone.id}/revisions/${unknown}`, params: { zoneId: zone.id, revisionId: unknown }, cookie });
    expect(missing.status).toBe(404);
    expect(missing.json.error?.code).toBe("revision:not-found");
  });

  it("another company's owner gets 404; a homeowner sees only their own home's zones", async () => {
    const other = await revisions(zone.id, await signInAs(people.otherCompanyOwner));
    expect(other.status).toBe(404);
    expect(JSON.stringify(other.json)).not.toContain("Family room");
    expect((await revisions(zone.id, await signInAs(people.homeowner))).status).toBe(200);
    expect((await revisions(zone.id, await signInAs(people.otherHomeowner))).status).toBe(404);
  });

  it("pages through a long history", async () => {
    const kitchen = await zoneIn("Lindqvist residence", "Kitchen");
    const theo = await actorFor(people.integrator);
    for (let i = 0; i < 24; i++) await editZone(theo, kitchen.id, { turnOnVolume: 10 + i });
    const cookie = await signInAs(people.integrator);
    const page2 = await revisions(kitchen.id, cookie, "?page=2&pageSize=10");
    expect(page2.json.total).toBe(25);
    expect(page2.json.items.map((r) => r.number)).toEqual([15, 14, 13, 12, 11, 10, 9, 8, 7, 6]);
    // The oldest item of a page is still summarised against the revision before it.
    expect(page2.json.items[9].summary).toBe("1 change: zone");
    const page3 = await revisions(kitchen.id, cookie, "?page=3&pageSize=10");
    expect(page3.json.items.at(-1)).toMatchObject({ number: 1, summary: "First revision" });
  });
});

describe("restoring a revision", () => {
  let zone: Awaited<ReturnType<typeof zoneIn>>;
  let firstId: string;

  beforeAll(async () => {
    zone = await zoneIn("Lindqvist residence", "Patio");
    const theo = await actorFor(people.integrator);
    await editZone(theo, zone.id, { volumeCeiling: 80, sourceOffset: { label: "Guest phone", db: 4 } });
    const [row] = await query<{ id: string }>("select id from zone_revisions where zone_id = $1 and number = 1", [zone.id]);
    firstId = row.id;
  });

  it("support may not restore (re-push only): 403 and nothing written", async () => {
    const before = await fingerprint();
    const res = await restore(zone.id, firstId, await signInAs(people.support), { expectedVersion: await versionOf(zone.id) });
    expect(res.status).toBe(403);
    expect(res.json.error?.message).toMatch(/re-push/);
    expect(await fingerprint()).toBe(before);
  });

  it("a homeowner may not restore; another company gets 404", async () => {
    const before = await fingerprint();
    expect((await restore(zone.id, firstId, await signInAs(people.homeowner), { expectedVersion: await versionOf(zone.id) })).status).toBe(403);
    expect((await restore(zone.id, firstId, await signInAs(people.otherCompanyOwner), { expectedVersion: 1 })).status).toBe(404);
    expect(await fingerprint()).toBe(before);
  });

  it("a stale version gets 409 and changes nothing", async () => {
    const before = await fingerprint();
    const res = await restore(zone.id, firstId, await signInAs(people.integrator), { expectedVersion: 1 });
    expect(res.status).toBe(409);
    expect(res.json.error?.code).toBe("zone:stale");
    expect(await fingerprint()).toBe(before);
  });

  it("a missing version is a 400 naming the field", async () => {
    const res = await restore(zone.id, firstId, await signInAs(people.integrator), {});
    expect(res.status).toBe(400);
    expect(res.json.error?.fieldErrors).toHaveProperty("expectedVersion");
  });

  it("restores revision 1 as a new revision 3 with the same content, and audits it field by field", async () => {
    const cookie = await signInAs(people.integrator);
    const version = await versionOf(zone.id);
    const res = await restore(zone.id, firstId, cookie, { expectedVersion: version, message: "Back to hand-over levels" });
    expect(res.status).toBe(200);
    expect(res.json).toMatchObject({ restoredFrom: 1, version: version + 1, revision: { number: 3, created: true } });
    const [r1, r3] = await query<{ number: number; content_hash: string; message: string; author_id: string }>(
      "select number, content_hash, message, author_id from zone_revisions where zone_id = $1 and number in (1, 3) order by number",
      [zone.id],
    );
    expect(r3.content_hash).toBe(r1.content_hash);
    expect(r3.message).toBe("Restored from revision 1: Back to hand-over levels");
    expect(await query("select volume_ceiling from zones where id = $1", [zone.id])).toEqual([{ volume_ceiling: 60 }]);
    const [audit] = await query<{ kind: string; actor_role: string; actor_name: string; home_id: string; summary: string; changes: { field: string; before: unknown; after: unknown }[] }>(
      "select kind, actor_role, actor_name, home_id, summary, changes from audit_events where zone_id = $1 order by id desc limit 1",
      [zone.id],
    );
    expect(audit).toMatchObject({ kind: "zone.restored", actor_role: "integrator", actor_name: "Theo Banerjee", home_id: zone.homeId, summary: "Restored “Patio” to revision 1" });
    expect(audit.changes).toEqual([
      { field: "Restored from revision", before: null, after: 1 },
      { field: "Zone · Volume ceiling", before: 80, after: 60 },
      { field: "Source “Guest phone” · Loudness offset", before: 4, after: -2 },
    ]);
  });

  it("restoring what is already current is refused with a reason and writes nothing", async () => {
    const before = await fingerprint();
    const res = await restore(zone.id, firstId, await signInAs(people.integrator), { expectedVersion: await versionOf(zone.id) });
    expect(res.status).toBe(422);
    expect(res.json.error?.message).toMatch(/same as the current configuration/);
    expect(await fingerprint()).toBe(before);
  });

  it("an installer restores in a home they work on, not in another", async () => {
    const suite = await zoneIn("Lindqvist residence", "Primary suite");
    const theo = await actorFor(people.integrator);
    await editZone(theo, suite.id, { volumeCeiling: 50 });
    const [r1] = await query<{ id: string }>("select id from zone_revisions where zone_id = $1 and number = 1", [suite.id]);
    const jonah = await signInAs(people.installer);
    const ok = await restore(suite.id, r1.id, jonah, { expectedVersion: await versionOf(suite.id) });
    expect(ok.status).toBe(200);

    const loft = await zoneIn("Brightwater loft", "Studio");
    await editZone(theo, loft.id, { volumeCeiling: 50 });
    const [l1] = await query<{ id: string }>("select id from zone_revisions where zone_id = $1 and number = 1", [loft.id]);
    const refused = await restore(loft.id, l1.id, jonah, { expectedVersion: await versionOf(loft.id) });
    expect(refused.status).toBe(403);
  });

  it("brings back deleted sources with their old keys, so the content hash matches again", async () => {
    const kitchen = await zoneIn("Nakagawa cottage", "Den");
    const [r1] = await query<{ id: string; content_hash: string }>("select id, content_hash from zone_revisions where zone_id = $1 and number = 1", [kitchen.id]);
    const theo = await actorFor(people.integrator);
    await editZone(theo, kitchen.id, { dropSources: true, dropPresets: true, detachCurves: true });
    expect(await query("select count(*)::int as n from sources where zone_id = $1", [kitchen.id])).toEqual([{ n: 0 }]);
    const res = await restore(kitchen.id, r1.id, await signInAs(people.owner), { expectedVersion: await versionOf(kitchen.id) });
    expect(res.status).toBe(200);
    const [latest] = await query<{ content_hash: string }>("select content_hash from zone_revisions where zone_id = $1 order by number desc limit 1", [kitchen.id]);
    expect(latest.content_hash).toBe(r1.content_hash);
  });

  it("when a library curve changed since, matches another curve by content or recreates it (audited)", async () => {
    const family = await zoneIn("Aalto townhouse", "Living room");
    const [r1] = await query<{ id: string; config: ZoneConfig }>("select id, config from zone_revisions where zone_id = $1 and number = 1", [family.id]);
    const curve = r1.config.zoneCurve ?? r1.config.sources.find((s) => s.toneCurve)?.toneCurve;
    expect(curve, "the demo zone uses a tone curve").toBeTruthy();
    // Someone edits the library curve in place: revision 1's bands no longer match it.
    await query("update tone_curve_bands set gain_db = gain_db - 1 where curve_id = $1", [curve!.id]);
    const theo = await actorFor(people.integrator);
    await editZone(theo, family.id, { volumeCeiling: 40 });
    const curvesBefore = await query<{ n: number }>("select count(*)::int as n from tone_curves");
    const res = await restore(family.id, r1.id, await signInAs(people.integrator), { expectedVersion: await versionOf(family.id) });
    expect(res.status).toBe(200);
    expect(res.json.curves).toEqual(expect.arrayContaining([{ name: `${curve!.name} (restored)`, outcome: "created" }]));
    expect(await query<{ n: number }>("select count(*)::int as n from tone_curves")).toEqual([{ n: curvesBefore[0].n + 1 }]);
    const [created] = await query<{ kind: string; summary: string }>("select kind, summary from audit_events where kind = 'curve.created' order by id desc limit 1");
    expect(created.summary).toContain(curve!.name);
    // The restored zone plays revision 1's bands again.
    const [latest] = await query<{ config: ZoneConfig }>("select config from zone_revisions where zone_id = $1 order by number desc limit 1", [family.id]);
    const restoredCurve = latest.config.zoneCurve ?? latest.config.sources.find((s) => s.toneCurve)?.toneCurve;
    expect(restoredCurve!.bands).toEqual(curve!.bands);

    // A second restore of the same revision now finds that curve by content instead of making another.
    await editZone(theo, family.id, { volumeCeiling: 41 });
    const again = await restore(family.id, r1.id, await signInAs(people.integrator), { expectedVersion: await versionOf(family.id) });
    expect(again.status).toBe(200);
    expect(again.json.curves).toEqual(expect.arrayContaining([{ name: `${curve!.name} (restored)`, outcome: "matched" }]));
    expect(await query<{ n: number }>("select count(*)::int as n from tone_curves")).toEqual([{ n: curvesBefore[0].n + 1 }]);
  });
});

describe("deleting a zone keeps its history", () => {
  it("needs zone:delete and the current version; integrators still read its history, support no longer sees it", async () => {
    const zone = await zoneIn("Marchetti lake house", "Guest loft");
    const del = (cookie: string, version: number) =>
      callRoute(deleteRoute, { method: "DELETE", path: `/api/zones/${zone.id}?expectedVersion=${version}`, params: { zoneId: zone.id }, cookie });
    const before = await fingerprint();
    expect((await del(await signInAs(people.installer), zone.version)).status).toBe(403);
    expect((await del(await signInAs(people.support), zone.version)).status).toBe(403);
    expect((await del(await signInAs(people.integrator), zone.version + 5)).status).toBe(409);
    expect(await fingerprint()).toBe(before);

    const [{ device_id: deviceId }] = await query<{ device_id: string }>("select device_id from zones where id = $1", [zone.id]);
    const ok = await del(await signInAs(people.integrator), zone.version);
    expect(ok.status).toBe(200);
    const [row] = await query<{ deleted_at: Date | null; device_id: string | null }>("select deleted_at, device_id from zones where id = $1", [zone.id]);
    expect(row.deleted_at).not.toBeNull();
    expect(row.device_id).toBeNull();
    const [audit] = await query<{ kind: string; changes: { field: string; before: unknown; after: unknown }[] }>(
      "select kind, changes from audit_events where zone_id = $1 order by id desc limit 1",
      [zone.id],
    );
    expect(audit.kind).toBe("zone.deleted");
    expect(audit.changes).toEqual(expect.arrayContaining([{ field: "deviceId", before: deviceId, after: null }]));

    const forOwner = await revisions(zone.id, await signInAs(people.owner));
    expect(forOwner.status).toBe(200);
    expect(forOwner.json.items.length).toBeGreaterThanOrEqual(1);
    expect(forOwner.json.zone.deletedAt).not.toBeNull();
    expect(forOwner.json.zone.canRestore).toBe(false);
    expect((await revisions(zone.id, await signInAs(people.integrator))).status).toBe(200);
    expect((await revisions(zone.id, await signInAs(people.support))).status).toBe(404);
    expect((await revisions(zone.id, await signInAs(people.otherHomeowner))).status).toBe(404);

    const [r1] = await query<{ id: string }>("select id from zone_revisions where zone_id = $1 and number = 1", [zone.id]);
    const res = await restore(zone.id, r1.id, await signInAs(people.integrator), { expectedVersion: zone.version + 1 });
    expect(res.status).toBe(410);
    expect(res.json.error?.code).toBe("zone:deleted");
    // Deleting again: the zone is gone for writes.
    expect((await del(await signInAs(people.integrator), zone.version + 1)).status).toBe(404);
  });
});

describe("deleting a zone with a push on its way", () => {
  it("cancels the zone's targets not sent yet, finishes their push, and leaves sent ones alone", async () => {
    const zone = await zoneIn("Nakagawa cottage", "Garden");
    const other = await zoneIn("Nakagawa cottage", "Den");
    const [org] = await query<{ organization_id: string }>("select organization_id from zones where id = $1", [zone.id]);
    // A push of both zones: the garden's target still queued, the den's already sent.
    const [push] = await query<{ id: string }>(
      "insert into pushes (organization_id, scope_kind, scope_label) values ($1, 'home', 'Nakagawa cottage') returning id",
      [org.organization_id],
    );
    const target = async (zoneId: string, state: string) => {
      const [row] = await query<{ id: string }>(
        `insert into push_targets (push_id, zone_id, device_id, revision_id, idempotency_key, state)
         select $1, z.id, z.device_id, z.current_revision_id, z.current_revision_id || ':' || z.device_id, $2 from zones z where z.id = $3 returning id`,
        [push.id, state, zoneId],
      );
      return row.id;
    };
    const queued = await target(zone.id, "queued");
    const sent = await target(other.id, "awaiting_report");

    const res = await callRoute(deleteRoute, {
      method: "DELETE",
      path: `/api/zones/${zone.id}?expectedVersion=${zone.version}`,
      params: { zoneId: zone.id },
      cookie: await signInAs(people.integrator),
    });
    expect(res.status).toBe(200);
    const states = await query<{ id: string; state: string; last_error: string | null }>("select id, state, last_error from push_targets where push_id = $1", [push.id]);
    expect(states.find((t) => t.id === queued)).toMatchObject({ state: "cancelled", last_error: "Zone “Garden” was deleted before this was sent." });
    expect(states.find((t) => t.id === sent)?.state).toBe("awaiting_report");
    // The den's target is still on its way, so the push runs on.
    expect((await query<{ status: string }>("select status from pushes where id = $1", [push.id]))[0].status).toBe("running");
    const [audit] = await query<{ changes: { field: string; after: unknown }[] }>("select changes from audit_events where zone_id = $1 order by id desc limit 1", [zone.id]);
    expect(audit.changes).toContainEqual({ field: "pending push targets cancelled", before: null, after: 1 });

    // A push whose only pending target belongs to the deleted zone ends at once, as cancelled.
    const [solo] = await query<{ id: string }>(
      "insert into pushes (organization_id, scope_kind, scope_label) values ($1, 'zone', 'Den') returning id",
      [org.organization_id],
    );
    await query(
      `insert into push_targets (push_id, zone_id, device_id, revision_id, idempotency_key, state)
       select $1, z.id, z.device_id, z.current_revision_id, z.current_revision_id || ':' || z.device_id || ':solo', 'queued' from zones z where z.id = $2`,
      [solo.id, other.id],
    );
    const den = await zoneIn("Nakagawa cottage", "Den");
    const gone = await callRoute(deleteRoute, {
      method: "DELETE",
      path: `/api/zones/${den.id}?expectedVersion=${den.version}`,
      params: { zoneId: den.id },
      cookie: await signInAs(people.integrator),
    });
    expect(gone.status).toBe(200);
    expect((await query<{ status: string }>("select status from pushes where id = $1", [solo.id]))[0].status).toBe("cancelled");
  });
});


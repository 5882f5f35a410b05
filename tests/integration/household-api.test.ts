import { afterAll, describe, expect, it } from "vitest";
import { GET as householdRoute } from "@/app/api/household/route";
import { PUT as orderRoute } from "@/app/api/household/zones/[zoneId]/presets/order/route";
import type { HouseholdReorderResult, HouseholdViewDto } from "@/db/queries/household";
import { stopBoss } from "@/lib/fleet/queue";
import { query } from "./helpers/database";
import { callRoute, people, signInAs } from "./helpers/http";

// The reorder starts a real push (jobs on pg-boss in the test database); no worker runs here.
afterAll(async () => {
  await stopBoss({ graceful: false });
});

type Route = Parameters<typeof callRoute>[0];
async function as(email: string, handler: Route, options: Omit<Parameters<typeof callRoute>[1], "cookie">) {
  return callRoute(handler, { ...options, cookie: await signInAs(email) });
}

async function zone(homeName: string, zoneName: string) {
  const [row] = await query<{ id: string; version: number }>(
    "select z.id, z.version from zones z join homes h on h.id = z.home_id where h.name = $1 and z.name = $2",
    [homeName, zoneName],
  );
  return row;
}

async function presetIds(zoneId: string) {
  const rows = await query<{ id: string; name: string }>("select id, name from stream_presets where zone_id = $1 order by position", [zoneId]);
  return rows;
}

function reorder(email: string, zoneId: string, body: unknown) {
  return as(email, orderRoute, { method: "PUT", path: `/api/household/zones/${zoneId}/presets/order`, params: { zoneId }, body });
}

describe("the household view", () => {
  it("a homeowner sees their home in plain words and nothing technical", async () => {
    const res = await as(people.homeowner, householdRoute, { path: "/api/household" });
    expect(res.status).toBe(200);
    const view = res.json as unknown as HouseholdViewDto;
    expect(view.homes.map((h) => h.name)).toEqual(["Lindqvist residence"]);
    const family = view.homes[0].zones.find((z) => z.name === "Family room")!;
    expect(family.sources.map((s) => `${s.label} (${s.kind})`)).toEqual(["TV (HDMI ARC)", "Turntable (Analog)", "Streaming (Network stream)", "Phone (Bluetooth)"]);
    expect(family.presets.map((p) => p.name)[0]).toBe("Harbor Lantern Jazz");
    expect(family.volumeCeiling).toBe(75);
    expect(family.delivery.state).toBe("waiting");
    const patio = view.homes[0].zones.find((z) => z.name === "Patio")!;
    expect(patio.guestControls).toEqual({ volume: true, source: true, wake: false, locked: false });
    // No device, serial, model, offsets, curves, outputs or template reach the household.
    const text = JSON.stringify(view);
    for (const word of ["serial", "FW4-", "fd-lindqvist", "loudnessOffset", "toneCurve", "outputLayout", "deviceSettings", "template", "Linkwitz", "Dialogue lift", "Marchetti"]) {
      expect(text).not.toContain(word);
    }
  });

  it("staff use the board, not this view", async () => {
    expect((await as(people.integrator, householdRoute, { path: "/api/household" })).status).toBe(403);
  });
});

describe("reordering favourite stations", () => {
  it("a homeowner reorders a room's stations: a new revision, an audit event, the result in plain words", async () => {
    const family = await zone("Lindqvist residence", "Family room");
    const before = await presetIds(family.id);
    const [{ n: revisionsBefore }] = await query<{ n: number }>("select count(*)::int as n from zone_revisions where zone_id = $1", [family.id]);
    const order = [before[2], before[0], before[1], before[3], before[4]];
    const res = await reorder(people.homeowner, family.id, { version: family.version, presetIds: order.map((p) => p.id) });
    expect(res.status).toBe(200);
    const result = res.json as unknown as HouseholdReorderResult;
    expect(result.zone.presets.map((p) => p.name)).toEqual(order.map((p) => p.name));
    expect(result.zone.version).toBe(family.version + 1);
    expect(result.revision.created).toBe(true);
    // The change goes out as a household push of this one zone; nothing claims the system has it yet.
    expect(result.push.outcome).toBe("started");
    expect(result.push.delivery.state).toBe("sending");
    expect(result.zone.delivery).toMatchObject({ state: "sending", text: "Sending to your system…" });
    const [target] = await query<{ scope_kind: string; state: string; revision_id: string; current: string }>(
      `select p.scope_kind, t.state, t.revision_id, z.current_revision_id as current
       from push_targets t join pushes p on p.id = t.push_id join zones z on z.id = t.zone_id where t.zone_id = $1`,
      [family.id],
    );
    expect(target).toMatchObject({ scope_kind: "household", state: "queued" });
    expect(target.revision_id).toBe(target.current);

    expect((await presetIds(family.id)).map((p) => p.name)).toEqual(order.map((p) => p.name));
    const [{ n: revisionsAfter }] = await query<{ n: number }>("select count(*)::int as n from zone_revisions where zone_id = $1", [family.id]);
    expect(revisionsAfter).toBe(revisionsBefore + 1);
    const [revision] = await query<{ config: { presets: { name: string }[] } }>(
      "select config from zone_revisions where zone_id = $1 order by number desc limit 1",
      [family.id],
    );
    expect(revision.config.presets.map((p) => p.name)).toEqual(order.map((p) => p.name));
    const audit = await query<{ kind: string; actor_role: string }>(
      "select kind, actor_role from audit_events where zone_id = $1 order by id desc limit 2",
      [family.id],
    );
    expect(audit).toEqual([
      { kind: "push.started", actor_role: "homeowner" },
      { kind: "household.presets.reordered", actor_role: "homeowner" },
    ]);
    // The zone came from a template: the household's order now survives template updates.
    const [row] = await query<{ overrides: string[] }>("select overrides from zones where id = $1", [family.id]);
    expect(row.overrides).toContain("presets.order");
  });

  it("a stale version is refused with 409 and changes nothing", async () => {
    const kitchen = await zone("Lindqvist residence", "Kitchen");
    const before = await presetIds(kitchen.id);
    const res = await reorder(people.homeowner, kitchen.id, { version: kitchen.version + 6, presetIds: [...before].reverse().map((p) => p.id) });
    expect(res.status).toBe(409);
    expect(res.json.error?.code).toBe("zone:stale");
    expect(await presetIds(kitchen.id)).toEqual(before);
  });

  it("the list must name each of the room's stations once", async () => {
    const kitchen = await zone("Lindqvist residence", "Kitchen");
    const before = await presetIds(kitchen.id);
    const missing = await reorder(people.homeowner, kitchen.id, { version: kitchen.version, presetIds: before.slice(1).map((p) => p.id) });
    expect(missing.status).toBe(422);
    const twice = await reorder(people.homeowner, kitchen.id, { version: kitchen.version, presetIds: [before[0].id, before[0].id, before[1].id] });
    expect(twice.status).toBe(422);
    const patio = await zone("Lindqvist residence", "Patio");
    const foreign = (await presetIds(patio.id)).map((p) => p.id);
    const other = await reorder(people.homeowner, kitchen.id, { version: kitchen.version, presetIds: [before[0].id, before[1].id, foreign[0]] });
    expect(other.status).toBe(422);
    const junk = await reorder(people.homeowner, kitchen.id, { version: "one", presetIds: ["x"] });
    expect(junk.status).toBe(400);
    expect(await presetIds(kitchen.id)).toEqual(before);
  });

  it("another household's room, or another company's, is not found", async () => {
    const dock = await zone("Marchetti lake house", "Dock");
    const ids = (await presetIds(dock.id)).map((p) => p.id);
    const res = await reorder(people.homeowner, dock.id, { version: dock.version, presetIds: [...ids].reverse() });
    expect(res.status).toBe(404);
    expect(JSON.stringify(res.json)).not.toContain("Dock");
    const lounge = await zone("Harbour view apartment", "Lounge");
    const other = await reorder(people.homeowner, lounge.id, { version: lounge.version, presetIds: (await presetIds(lounge.id)).map((p) => p.id) });
    expect(other.status).toBe(404);
  });

  it("a room whose settings support has locked keeps its order", async () => {
    const suite = await zone("Lindqvist residence", "Primary suite");
    await query("update zones set guest_locked = true, lock_reason = 'Hearing-safe levels agreed with the family' where id = $1", [suite.id]);
    const before = await presetIds(suite.id);
    const res = await reorder(people.homeowner, suite.id, { version: suite.version, presetIds: [...before].reverse().map((p) => p.id) });
    expect(res.status).toBe(423);
    expect(res.json.error?.message).toMatch(/locked/);
    expect(await presetIds(suite.id)).toEqual(before);
    await query("update zones set guest_locked = false, lock_reason = null where id = $1", [suite.id]);
  });
});

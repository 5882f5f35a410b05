import { describe, expect, it } from "vitest";
import { GET as boardRoute } from "@/app/api/homes/[homeId]/board/route";
import { PUT as presetOrderRoute } from "@/app/api/zones/[zoneId]/presets/order/route";
import type { BoardDto } from "@/lib/board/types";
import { query } from "./helpers/database";
import { as, homeIdByName, presetsOf, zoneByName } from "./helpers/board";
import { people } from "./helpers/http";

// The board answer is cached per process and carries an ETag; both rest on the
// version stamps the database triggers keep (drizzle/0002). Every change below
// is made straight in the database, the way another process (the push worker,
// another app instance, a restore) would make it, and must show at once.

async function read(email: string, homeName: string, headers: Record<string, string> = {}) {
  const homeId = await homeIdByName(homeName);
  return as(email, boardRoute, { path: `/api/homes/${homeId}/board`, params: { homeId }, headers });
}

async function dto(homeName: string) {
  const res = await read(people.integrator, homeName);
  expect(res.status).toBe(200);
  return { board: res.json as unknown as BoardDto, etag: res.headers.get("etag")! };
}

async function boardVersion(homeName: string) {
  const [row] = await query<{ v: string }>("select board_version::text as v from homes where name = $1", [homeName]);
  return Number(row.v);
}

describe("board answer: cache and ETag", () => {
  it("answers 304 with no body to a matching If-None-Match, and a new ETag for another reader", async () => {
    const first = await read(people.integrator, "Lindqvist residence");
    const etag = first.headers.get("etag");
    expect(etag).toMatch(/^W\/"b\d+\.l\d+\.[\w-]+"$/);
    expect(first.headers.get("cache-control")).toBe("private, no-cache");
    // The cached part is sent as it is: a second answer is the same, byte for byte, and says its length.
    const repeat = await read(people.integrator, "Lindqvist residence");
    expect(repeat.text).toBe(first.text);
    expect(Number(repeat.headers.get("content-length"))).toBe(Buffer.byteLength(first.text));
    const again = await read(people.integrator, "Lindqvist residence", { "if-none-match": etag! });
    expect(again.status).toBe(304);
    expect(again.text).toBe("");
    // A list of tags (RFC 9110 §13.1.2) matches too.
    const listed = await read(people.integrator, "Lindqvist residence", { "if-none-match": `W/"other", ${etag}` });
    expect(listed.status).toBe(304);
    // Another role may do other things, so the same board is another answer.
    const support = await read(people.support, "Lindqvist residence", { "if-none-match": etag! });
    expect(support.status).toBe(200);
    expect(support.headers.get("etag")).not.toBe(etag);
    expect((support.json as unknown as BoardDto).may.editZone).toBe(false);
  });

  it("shows a source changed by another process at once", async () => {
    const before = await dto("Lindqvist residence");
    await query("update sources set loudness_offset_db = -7.5 where label = 'TV' and zone_id = (select id from zones where name = 'Family room' and home_id = (select id from homes where name = 'Lindqvist residence'))");
    const after = await dto("Lindqvist residence");
    expect(after.etag).not.toBe(before.etag);
    expect(after.board.zones[0].sources.find((s) => s.label === "TV")?.loudnessOffsetDb).toBe(-7.5);
    const stale = await read(people.integrator, "Lindqvist residence", { "if-none-match": before.etag });
    expect(stale.status).toBe(200);
  });

  it("shows a device going offline, a curve's band changing and a lock holder's new name", async () => {
    await dto("Aalto townhouse");
    await query("update devices set online = false where serial = (select d.serial from devices d join zones z on z.device_id = d.id where z.name = 'Gym')");
    let board = (await dto("Aalto townhouse")).board;
    expect(board.zones.find((z) => z.name === "Gym")?.device?.online).toBe(false);

    const curve = board.curves.find((c) => c.bands.length > 0)!;
    await query("update tone_curve_bands set gain_db = 4.5 where curve_id = $1 and position = 0", [curve.id]);
    board = (await dto("Aalto townhouse")).board;
    expect(board.curves.find((c) => c.id === curve.id)?.bands[0].gainDb).toBe(4.5);
    // The library is the company's: every home's board sees it.
    expect((await dto("Brightwater loft")).board.curves.find((c) => c.id === curve.id)?.bands[0].gainDb).toBe(4.5);

    const [priya] = await query<{ id: string }>("select id from \"user\" where email = $1", [people.support]);
    await query("update zones set guest_locked = true, locked_by = $1, locked_at = now(), lock_reason = 'test' where name = 'Gym'", [priya.id]);
    expect((await dto("Aalto townhouse")).board.zones.find((z) => z.name === "Gym")?.guest.lockedByName).toBe("Priya Raman");
    await query("update \"user\" set name = 'Priya Raman-Okafor' where id = $1", [priya.id]);
    expect((await dto("Aalto townhouse")).board.zones.find((z) => z.name === "Gym")?.guest.lockedByName).toBe("Priya Raman-Okafor");
  });

  it("shows a renamed home and a deleted curve", async () => {
    await dto("Nakagawa cottage");
    await query("update homes set name = 'Nakagawa cottage (renamed)' where name = 'Nakagawa cottage'");
    expect((await dto("Nakagawa cottage (renamed)")).board.home.name).toBe("Nakagawa cottage (renamed)");
    const [added] = await query<{ id: string }>(
      "insert into tone_curves (organization_id, name) select organization_id, 'Porch evening' from homes where name = 'Nakagawa cottage (renamed)' returning id",
    );
    expect((await dto("Nakagawa cottage (renamed)")).board.curves.map((c) => c.name)).toContain("Porch evening");
    await query("delete from tone_curves where id = $1", [added.id]);
    expect((await dto("Nakagawa cottage (renamed)")).board.curves.map((c) => c.name)).not.toContain("Porch evening");
  });

  it("moves the home's version once per statement, however many cards it touches, and not at all for a refused write", async () => {
    const zone = await zoneByName("Lindqvist residence", "Family room");
    const presets = await presetsOf(zone.id);
    expect(presets.length).toBe(5);
    const start = await boardVersion("Lindqvist residence");
    // One statement over five presets: one bump (statement-level triggers).
    await query("update stream_presets set updated_at = now() where zone_id = $1", [zone.id]);
    expect(await boardVersion("Lindqvist residence")).toBe(start + 1);
    // A statement that touches no row leaves it alone.
    await query("update stream_presets set updated_at = now() where zone_id = $1 and false", [zone.id]);
    expect(await boardVersion("Lindqvist residence")).toBe(start + 1);

    const reversed = presets.map((p) => p.id).reverse();
    const ok = await as(people.integrator, presetOrderRoute, {
      method: "PUT",
      path: `/api/zones/${zone.id}/presets/order`,
      params: { zoneId: zone.id },
      body: { version: zone.version, ids: reversed },
    });
    expect(ok.status).toBe(200);
    const afterReorder = await boardVersion("Lindqvist residence");
    expect(afterReorder).toBeGreaterThan(start + 1);
    const stale = await as(people.integrator, presetOrderRoute, {
      method: "PUT",
      path: `/api/zones/${zone.id}/presets/order`,
      params: { zoneId: zone.id },
      body: { version: zone.version, ids: presets.map((p) => p.id) },
    });
    expect(stale.status).toBe(409);
    expect(await boardVersion("Lindqvist residence")).toBe(afterReorder);
    expect((await dto("Lindqvist residence")).board.zones[0].presets.map((p) => p.id)).toEqual(reversed);
  });
});

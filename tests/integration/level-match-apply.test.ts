// Level match end to end through the route handlers: upload clips (generated
// with wavefile), read the zone's items, compute the suggestions the page
// shows (lib/zones/level-match-rows.ts), apply them through changeZone →
// a new version, a revision and an audit event; stale writes get 409.
// Reference readings: EBU Tech 3341 (v4) Table 1 cases 1 and 2 — a stereo
// 1 kHz sine at −23 dBFS reads −23.0 LUFS and at −33 dBFS reads −33.0 LUFS, so
// matching the second to the first needs +10 dB (arithmetic on those values).
import { beforeAll, describe, expect, it } from "vitest";
import { POST as clipsRoute } from "@/app/api/zones/[zoneId]/clips/route";
import { GET as levelMatchGet, POST as levelMatchPost } from "@/app/api/zones/[zoneId]/level-match/route";
import type { LevelMatchDto } from "@/db/queries/level-match";
import { levelMatchTable } from "@/lib/zones/level-match-rows";
import { query } from "./helpers/database";
import { callRoute, people, signInAs } from "./helpers/http";
import { count, sineWav, upload, zoneId } from "./helpers/audio";

let zone: { id: string; version: number };
const ids: Record<string, string> = {};

async function read(email: string = people.integrator) {
  const res = await callRoute(levelMatchGet, { path: `/api/zones/${zone.id}/level-match`, params: { zoneId: zone.id }, cookie: await signInAs(email) });
  return { status: res.status, dto: res.json as unknown as LevelMatchDto };
}

async function apply(email: string, body: unknown) {
  return callRoute(levelMatchPost, { method: "POST", path: `/api/zones/${zone.id}/level-match`, params: { zoneId: zone.id }, body, cookie: await signInAs(email) });
}

/** A 1 kHz sine at `level` dBFS with one sample at `spikeDbfs` in the middle: loudness of the sine, true peak near the spike. */
function sineWithSpike(level: number, spikeDbfs: number) {
  const bytes = sineWav(level, 6);
  const view = new DataView(bytes.buffer, bytes.byteOffset);
  const frame = 44 + 6 * (3 * 48_000);
  const word = Math.round(Math.pow(10, spikeDbfs / 20) * 8388607);
  for (const offset of [0, 3]) {
    view.setUint8(frame + offset, word & 0xff);
    view.setUint8(frame + offset + 1, (word >> 8) & 0xff);
    view.setUint8(frame + offset + 2, (word >> 16) & 0xff);
  }
  return bytes;
}

beforeAll(async () => {
  zone = await zoneId("Lindqvist residence", "Family room");
  for (const label of ["TV", "Turntable", "Streaming", "Phone"]) {
    const [row] = await query<{ id: string }>("select id from sources where zone_id = $1 and label = $2", [zone.id, label]);
    ids[label] = row!.id;
  }
  const clips: [string, Uint8Array][] = [
    ["TV", sineWav(-23, 6)],
    ["Streaming", sineWav(-33, 6)],
    ["Turntable", sineWithSpike(-30, -3)],
    ["Phone", sineWav(-45, 6)],
  ];
  for (const [label, bytes] of clips) {
    const res = await upload(clipsRoute, {
      path: `/api/zones/${zone.id}/clips`,
      params: { zoneId: zone.id },
      email: people.integrator,
      file: { name: `${label.toLowerCase()}.wav`, bytes },
      fields: { sourceId: ids[label]! },
    });
    expect(res.status).toBe(201);
  }
});

describe("level-match suggestions", () => {
  it("lists every source and preset with its latest clip; suggestions follow the reference", async () => {
    const { status, dto } = await read(people.support);
    expect(status).toBe(200);
    expect(dto.may.edit).toBe(false);
    expect(dto.items.filter((i) => i.clip).map((i) => i.label).sort()).toEqual(["Phone", "Streaming", "TV", "Turntable"]);
    expect(dto.items.filter((i) => i.kind === "preset").length).toBe(5);

    const table = levelMatchTable(dto.items, { kind: "reference", ref: { kind: "source", id: ids.TV! } });
    expect(Math.abs(table.targetLufs! + 23)).toBeLessThan(0.1);
    const row = (label: string) => table.rows.find((r) => r.label === label)!;
    // −33 LUFS → −23 LUFS: +10 dB (Tech 3341 cases 1 and 2), rounded to the 0.5 dB step.
    expect(row("Streaming").suggestion).toMatchObject({ offsetDb: 10, clamped: false });
    expect(row("TV").suggestion).toMatchObject({ offsetDb: 0 });
    // −45 → −23 would need +22 dB; the trim range ends at +12 dB.
    expect(row("Phone").suggestion).toMatchObject({ offsetDb: 12, clamped: true });
    // About −30 LUFS with a −3 dBFS spike: +7 dB puts the true peak near +4 dBTP, over full scale.
    expect(row("Turntable").suggestion!.offsetDb).toBe(7);
    expect(row("Turntable").headroom!.wouldClip).toBe(true);
    expect(row("Turntable").headroom!.predictedPeakDbtp).toBeGreaterThan(3.5);
    expect(row("Streaming").headroom!.wouldClip).toBe(false);
    expect(row("Quiet Pines Classical").status).toBe("no-clip");

    const towardsTarget = levelMatchTable(dto.items, { kind: "lufs", lufs: -30 });
    expect(towardsTarget.rows.find((r) => r.label === "TV")!.suggestion!.offsetDb).toBe(-7);
    const noClip = levelMatchTable(dto.items, { kind: "reference", ref: { kind: "preset", id: dto.items.find((i) => i.kind === "preset")!.id } });
    expect(noClip.problem).toMatch(/has no measured clip yet/);
  });
});

describe("applying suggestions", () => {
  it("applies all suggestions as one audited zone change with a revision", async () => {
    const { dto } = await read();
    const table = levelMatchTable(dto.items, { kind: "reference", ref: { kind: "source", id: ids.TV! } });
    const items = table.rows.filter((r) => r.suggestion?.changes).map((r) => ({ kind: r.kind, id: r.id, loudnessOffsetDb: r.suggestion!.offsetDb }));
    expect(items.length).toBe(4); // TV goes from −4 to 0; the three others change too
    const revisions = await count("select 1 from zone_revisions where zone_id = $1", [zone.id]);
    const res = await apply(people.integrator, { version: dto.zone.version, items });
    expect(res.status).toBe(200);
    expect(res.json.version).toBe(dto.zone.version + 1);
    expect(await count("select 1 from zone_revisions where zone_id = $1", [zone.id])).toBe(revisions + 1);
    const offsets = await query<{ label: string; loudness_offset_db: number }>("select label, loudness_offset_db from sources where zone_id = $1 order by position", [zone.id]);
    expect(Object.fromEntries(offsets.map((o) => [o.label, o.loudness_offset_db]))).toEqual({ TV: 0, Turntable: 7, Streaming: 10, Phone: 12 });
    const [audit] = await query<{ kind: string; actor_role: string; changes: { field: string; before: number; after: number }[] }>(
      "select kind, actor_role, changes from audit_events where zone_id = $1 order by created_at desc limit 1",
      [zone.id],
    );
    expect(audit!.kind).toBe("zone.level-matched");
    expect(audit!.changes).toContainEqual({ field: `source.${ids.Streaming}.loudnessOffsetDb`, before: 0, after: 10 });
    const [rev] = await query<{ message: string }>("select message from zone_revisions where zone_id = $1 order by number desc limit 1", [zone.id]);
    expect(rev!.message).toBe("Level match from measured clips");
  });

  it("answers 409 on a stale version and changes nothing", async () => {
    const { dto } = await read();
    const before = await query("select label, loudness_offset_db from sources where zone_id = $1 order by position", [zone.id]);
    const res = await apply(people.owner, { version: dto.zone.version - 1, items: [{ kind: "source", id: ids.Phone!, loudnessOffsetDb: 1 }] });
    expect(res.status).toBe(409);
    expect(res.json.error?.code).toBe("zone:stale");
    expect(await query("select label, loudness_offset_db from sources where zone_id = $1 order by position", [zone.id])).toEqual(before);
  });

  it("validates offsets (range and 0.5 dB step) and roles on the server", async () => {
    const { dto } = await read();
    const bad = await apply(people.integrator, {
      version: dto.zone.version,
      items: [
        { kind: "source", id: ids.Phone!, loudnessOffsetDb: 12.5 },
        { kind: "source", id: ids.TV!, loudnessOffsetDb: 1.25 },
      ],
    });
    expect(bad.status).toBe(400);
    expect(bad.json.error?.fieldErrors?.["items.0.loudnessOffsetDb"]?.[0]).toMatch(/at most \+12 dB/);
    expect(bad.json.error?.fieldErrors?.["items.1.loudnessOffsetDb"]?.[0]).toMatch(/steps of 0.5 dB/);
    const support = await apply(people.support, { version: dto.zone.version, items: [{ kind: "source", id: ids.Phone!, loudnessOffsetDb: 1 }] });
    expect(support.status).toBe(403);
    // Jonah (installer) is assigned to the Lindqvist residence.
    const installer = await apply(people.installer, { version: dto.zone.version, items: [{ kind: "source", id: ids.Phone!, loudnessOffsetDb: 11.5 }] });
    expect(installer.status).toBe(200);
    const kitchen = await zoneId("Lindqvist residence", "Kitchen");
    const [radio] = await query<{ id: string }>("select id from sources where zone_id = $1 and label = 'Kitchen radio'", [kitchen.id]);
    const foreign = await apply(people.integrator, { version: dto.zone.version + 1, items: [{ kind: "source", id: radio!.id, loudnessOffsetDb: 1 }] });
    expect(foreign.status).toBe(404);
    expect(foreign.json.error?.code).toBe("source:not-found");
  });
});

// Level-match clip upload: POST /api/zones/:zoneId/clips with a WAV generated
// here with wavefile. Reference readings: EBU Tech 3341 (v4) Table 1, case 1 —
// a stereo 1 kHz sine at −23 dBFS reads −23.0 LUFS (±0.1 LU); the true peak of
// a 1 kHz sine is its amplitude (analytic), here −23 dBTP (±0.2 dB, the
// tolerance Tech 3341 gives for true peak). Bad uploads get a clear error and
// leave no row and no audit event behind.
import { describe, expect, it } from "vitest";
import { GET as listClipsRoute, POST as clipsRoute } from "@/app/api/zones/[zoneId]/clips/route";
import { query } from "./helpers/database";
import { callRoute, people, signInAs } from "./helpers/http";
import { count, hugeMultipart, sineWav, upload, zoneId } from "./helpers/audio";

async function sourceId(zone: string, label: string) {
  const [row] = await query<{ id: string }>("select id from sources where zone_id = $1 and label = $2", [zone, label]);
  return row!.id;
}

async function presetId(zone: string, name: string) {
  const [row] = await query<{ id: string }>("select id from stream_presets where zone_id = $1 and name = $2", [zone, name]);
  return row!.id;
}

function send(email: string, zone: string, file: { name: string; bytes: Uint8Array } | undefined, fields: Record<string, string>, headers?: Record<string, string>) {
  return upload(clipsRoute, { path: `/api/zones/${zone}/clips`, params: { zoneId: zone }, email, file, fields, headers });
}

async function nothingStored<T>(fn: () => Promise<T>): Promise<T> {
  const before = [await count("select 1 from level_match_clips"), await count("select 1 from audit_events")];
  const result = await fn();
  expect([await count("select 1 from level_match_clips"), await count("select 1 from audit_events")]).toEqual(before);
  return result;
}

/** A canonical 44-byte PCM header declaring `dataBytes` of 16-bit stereo 48 kHz, followed by `present` zero bytes. */
function headerOnlyWav(dataBytes: number, present: number) {
  const buf = Buffer.alloc(44 + present);
  buf.write("RIFF", 0, "ascii");
  buf.writeUInt32LE(36 + dataBytes, 4);
  buf.write("WAVE", 8, "ascii");
  buf.write("fmt ", 12, "ascii");
  buf.writeUInt32LE(16, 16);
  buf.writeUInt16LE(1, 20);
  buf.writeUInt16LE(2, 22);
  buf.writeUInt32LE(48_000, 24);
  buf.writeUInt32LE(48_000 * 4, 28);
  buf.writeUInt16LE(4, 32);
  buf.writeUInt16LE(16, 34);
  buf.write("data", 36, "ascii");
  buf.writeUInt32LE(dataBytes, 40);
  return new Uint8Array(buf);
}

describe("POST /api/zones/:zoneId/clips", () => {
  it("measures an uploaded clip and stores the measurement (not the audio), audited", async () => {
    const zone = await zoneId("Lindqvist residence", "Family room");
    const tv = await sourceId(zone.id, "TV");
    const res = await send(people.integrator, zone.id, { name: "tv-news.wav", bytes: sineWav(-23, 10) }, { sourceId: tv });
    expect(res.status).toBe(201);
    expect(Math.abs((res.json.integratedLufs as number) + 23)).toBeLessThan(0.1);
    expect(Math.abs((res.json.truePeakDbtp as number) + 23)).toBeLessThan(0.2);
    expect(res.json).toMatchObject({ fileName: "tv-news.wav", sampleRate: 48_000, channelCount: 2, durationSeconds: 10, target: { kind: "source", id: tv, label: "TV" } });
    // A steady tone has no loudness range (Tech 3342's LRA of a constant level is 0 LU).
    expect(res.json.loudnessRangeLu).toBe(0);
    const [row] = await query<Record<string, unknown>>("select * from level_match_clips where zone_id = $1", [zone.id]);
    expect(Object.keys(row!)).not.toContain("audio");
    const [audit] = await query<{ kind: string; summary: string }>("select kind, summary from audit_events where zone_id = $1 order by created_at desc limit 1", [zone.id]);
    expect(audit).toEqual({ kind: "zone.clip-measured", summary: "Measured a level-match clip of “TV” in “Family room”: -23.0 LUFS, true peak -23.0 dBTP" });

    const list = await callRoute(listClipsRoute, { path: `/api/zones/${zone.id}/clips`, params: { zoneId: zone.id }, cookie: await signInAs(people.support) });
    expect(list.status).toBe(200);
    expect((list.json.items as { fileName: string }[]).map((c) => c.fileName)).toEqual(["tv-news.wav"]);
  });

  it("takes a clip for a stream preset, and a 44.1 kHz file", async () => {
    const zone = await zoneId("Lindqvist residence", "Kitchen");
    const preset = await presetId(zone.id, "Lighthouse Talk");
    const res = await send(people.installer, zone.id, { name: "talk.wav", bytes: sineWav(-33, 6, 44_100) }, { presetId: preset });
    expect(res.status).toBe(201);
    // EBU Tech 3341 case 2: stereo 1 kHz at −33 dBFS → −33.0 LUFS (±0.1); the Recommendation is rate-independent.
    expect(Math.abs((res.json.integratedLufs as number) + 33)).toBeLessThan(0.1);
    expect(res.json).toMatchObject({ sampleRate: 44_100, target: { kind: "preset", id: preset } });
  });

  it("refuses non-WAV, truncated and too-long files with a clear message, storing nothing", async () => {
    const zone = await zoneId("Lindqvist residence", "Family room");
    const tv = await sourceId(zone.id, "TV");
    const notWav = await nothingStored(() => send(people.integrator, zone.id, { name: "notes.txt", bytes: new TextEncoder().encode("not audio at all") }, { sourceId: tv }));
    expect(notWav.status).toBe(422);
    expect(notWav.json.error).toMatchObject({ code: "clip:invalid", details: { reason: "audio:not-wav" } });
    expect(notWav.json.error?.message).toBe("notes.txt: This is not a WAV file (no RIFF/WAVE header). Nothing was stored.");

    const whole = sineWav(-23, 2);
    const truncated = await nothingStored(() => send(people.integrator, zone.id, { name: "cut.wav", bytes: whole.slice(0, whole.length - 1000) }, { sourceId: tv }));
    expect(truncated.status).toBe(422);
    expect(truncated.json.error?.details?.reason).toBe("audio:truncated");
    expect(truncated.json.error?.fieldErrors?.file?.[0]).toMatch(/declares \d+ bytes but only \d+ are present/);

    // The header declares 400 s (the limit is 300 s): refused from the header, before any sample is decoded.
    const long = await nothingStored(() => send(people.integrator, zone.id, { name: "long.wav", bytes: headerOnlyWav(400 * 48_000 * 4, 4800) }, { sourceId: tv }));
    expect(long.status).toBe(422);
    expect(long.json.error?.details?.reason).toBe("audio:too-long");
    expect(long.json.error?.message).toMatch(/400\.0 s long; the limit is 300 s/);
  });

  it("refuses an oversized upload from Content-Length, and while streaming when there is none", async () => {
    const zone = await zoneId("Lindqvist residence", "Family room");
    const tv = await sourceId(zone.id, "TV");
    const declared = await nothingStored(() =>
      send(people.integrator, zone.id, { name: "x.wav", bytes: sineWav(-23, 1) }, { sourceId: tv }, { "content-length": String(200 * 1024 * 1024) }),
    );
    expect(declared.status).toBe(413);
    expect(declared.json.error?.message).toMatch(/limit is 64 MB/);

    const huge = hugeMultipart(80, { sourceId: tv });
    const streamed = await nothingStored(() => upload(clipsRoute, { path: `/api/zones/${zone.id}/clips`, params: { zoneId: zone.id }, email: people.integrator, rawBody: huge }));
    expect(streamed.status).toBe(413);
    // Stopped reading shortly after the 64 MB limit rather than taking all 80 MB.
    expect(huge.pulledChunks()).toBeLessThan(70);
  });

  it("checks role and tenant before reading the upload", async () => {
    const zone = await zoneId("Lindqvist residence", "Family room");
    const tv = await sourceId(zone.id, "TV");
    const wav = { name: "tv.wav", bytes: sineWav(-23, 1) };
    expect((await nothingStored(() => send(people.support, zone.id, wav, { sourceId: tv }))).status).toBe(403);
    expect((await nothingStored(() => send(people.homeowner, zone.id, wav, { sourceId: tv }))).status).toBe(403);
    expect((await nothingStored(() => send(people.otherCompanyOwner, zone.id, wav, { sourceId: tv }))).status).toBe(404);
    const notAssigned = await zoneId("Brightwater loft", "Studio");
    const mixer = await sourceId(notAssigned.id, "Mixer out");
    expect((await nothingStored(() => send(people.installer, notAssigned.id, wav, { sourceId: mixer }))).status).toBe(403);
  });

  it("the source must belong to the zone, and exactly one of sourceId / presetId is given", async () => {
    const zone = await zoneId("Lindqvist residence", "Family room");
    const kitchen = await zoneId("Lindqvist residence", "Kitchen");
    const foreign = await sourceId(kitchen.id, "Kitchen radio");
    const wav = { name: "a.wav", bytes: sineWav(-23, 1) };
    const wrongZone = await nothingStored(() => send(people.integrator, zone.id, wav, { sourceId: foreign }));
    expect(wrongZone.status).toBe(404);
    expect(wrongZone.json.error?.code).toBe("source:not-found");
    const both = await nothingStored(() => send(people.integrator, zone.id, wav, { sourceId: foreign, presetId: foreign }));
    expect(both.status).toBe(400);
    expect(both.json.error?.fieldErrors?.sourceId?.[0]).toMatch(/not both/);
    const noFile = await nothingStored(() => send(people.integrator, zone.id, undefined, { sourceId: foreign }));
    expect(noFile.status).toBe(400);
  });
});

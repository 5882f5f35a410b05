import { beforeAll, describe, expect, it } from "vitest";
import { GET as exportRoute } from "@/app/api/homes/[homeId]/backup/route";
import { POST as previewRoute } from "@/app/api/homes/[homeId]/backup/preview/route";
import { POST as restoreRoute } from "@/app/api/homes/[homeId]/backup/restore/route";
import { backupContentHash, type BackupFile } from "@/lib/validation/backup";
import { query } from "./helpers/database";
import { editZone, actorFor, fingerprint, homeId as homeIdOf, sendRaw } from "./helpers/history";
import { people, signInAs } from "./helpers/http";

// Malformed backup files: each gets a clear error naming what is wrong, and
// nothing is written (the whole database fingerprint is compared).

let homeId: string;
let cookie: string;
let good: BackupFile;

beforeAll(async () => {
  homeId = await homeIdOf("Lindqvist residence");
  cookie = await signInAs(people.integrator);
  const res = await sendRaw(exportRoute, { method: "GET", path: `/api/homes/${homeId}/backup`, params: { homeId }, cookie });
  good = JSON.parse(res.text) as BackupFile;
  // Make the home differ from the file, so a wrongly accepted file would write something.
  const theo = await actorFor(people.integrator);
  for (const z of good.zones) await editZone(theo, z.id, { volumeCeiling: 11 });
});

function restore(body: BodyInit | null, headers: Record<string, string> = { "content-type": "application/json" }) {
  return sendRaw(restoreRoute, { path: `/api/homes/${homeId}/backup/restore`, params: { homeId }, cookie, body, headers });
}

function resealed(mutate: (f: BackupFile & Record<string, unknown>) => void): string {
  const f = structuredClone(good) as BackupFile & Record<string, unknown>;
  mutate(f);
  return JSON.stringify({ ...f, contentHash: backupContentHash(f) });
}

async function expectRefused(res: Awaited<ReturnType<typeof restore>>, status: number, code: string, message: RegExp, before: string) {
  expect(res.status, res.text).toBe(status);
  expect(res.json.error?.code).toBe(code);
  expect(res.json.error?.message).toMatch(message);
  expect(await fingerprint()).toBe(before);
}

describe("malformed backup files write nothing", () => {
  it("the good file is accepted (the control case)", async () => {
    const res = await sendRaw(previewRoute, {
      path: `/api/homes/${homeId}/backup/preview`,
      params: { homeId },
      cookie,
      body: JSON.stringify(good),
      headers: { "content-type": "application/json" },
    });
    expect(res.status).toBe(200);
    expect((res.json.zones as { action: string }[]).every((z) => z.action === "update")).toBe(true);
  });

  it("truncated JSON", async () => {
    const before = await fingerprint();
    const text = JSON.stringify(good);
    await expectRefused(await restore(text.slice(0, Math.floor(text.length * 0.7))), 422, "backup:invalid", /not valid JSON.*cut short/, before);
  });

  it("an empty body, and a file that is not a backup", async () => {
    const before = await fingerprint();
    await expectRefused(await restore(""), 422, "backup:invalid", /No file was uploaded/, before);
    await expectRefused(await restore(JSON.stringify({ hello: "world" })), 422, "backup:invalid", /not a Zonewright home backup/, before);
    await expectRefused(await restore("[1,2,3]"), 422, "backup:invalid", /not a Zonewright home backup/, before);
  });

  it("wrong types name the bad field by its path", async () => {
    const before = await fingerprint();
    const body = resealed((f) => {
      (f.zones[3].config.sources[1] as Record<string, unknown>).loudnessOffsetDb = "loud";
      (f.zones[0].config as Record<string, unknown>).volumeCeiling = 140;
    });
    const res = await restore(body);
    await expectRefused(res, 422, "backup:invalid", /2 problems; the first is at zones\[0\]\.config\.volumeCeiling/, before);
    expect(Object.keys(res.json.error!.fieldErrors!)).toEqual(["zones[0].config.volumeCeiling", "zones[3].config.sources[1].loudnessOffsetDb"]);
    expect(res.json.error!.fieldErrors!["zones[3].config.sources[1].loudnessOffsetDb"][0]).toMatch(/number/);
  });

  it("a file broken by schema in its last zone is refused before anything is written", async () => {
    const before = await fingerprint();
    const body = resealed((f) => {
      f.zones[0].config.volumeCeiling = 40;
      f.zones.at(-1)!.config.presets[0].loudnessOffsetDb = 40;
    });
    await expectRefused(await restore(body), 422, "backup:invalid", /zones\[3\]\.config\.presets\[0\]\.loudnessOffsetDb/, before);
  });

  it("unknown schema versions are refused with the reason", async () => {
    const before = await fingerprint();
    await expectRefused(await restore(JSON.stringify({ ...good, schemaVersion: 2 })), 422, "backup:unsupported-version", /schema version 2, made by a newer Zonewright; this one reads versions 0 to 1/, before);
    await expectRefused(await restore(JSON.stringify({ ...good, schemaVersion: -1 })), 422, "backup:unsupported-version", /does not exist/, before);
    await expectRefused(await restore(JSON.stringify({ ...good, schemaVersion: "1" })), 422, "backup:unsupported-version", /whole number/, before);
  });

  it("a file edited without a new hash is refused as changed or damaged", async () => {
    const before = await fingerprint();
    const edited = structuredClone(good);
    edited.zones[0].config.volumeCeiling = 70;
    await expectRefused(await restore(JSON.stringify(edited)), 422, "backup:invalid", /does not match its content hash/, before);
  });

  it("duplicate zone ids and source keys are named", async () => {
    const before = await fingerprint();
    const res = await restore(
      resealed((f) => {
        f.zones[1].id = f.zones[0].id;
        f.zones[2].config.sources[1].key = f.zones[2].config.sources[0].key;
      }),
    );
    await expectRefused(res, 422, "backup:invalid", /problems/, before);
    expect(Object.keys(res.json.error!.fieldErrors!)).toEqual(["zones[1].id", "zones[2].config.sources[1].key"]);
  });

  it("a 50 MB upload that declares its size is refused before a byte is read", async () => {
    const before = await fingerprint();
    let pulled = 0;
    const chunk = new Uint8Array(64 * 1024).fill(0x20);
    const body = new ReadableStream<Uint8Array>({
      pull(controller) {
        pulled += chunk.byteLength;
        if (pulled > 50 * 1024 * 1024) controller.close();
        else controller.enqueue(chunk);
      },
    });
    const res = await restore(body, { "content-type": "application/json", "content-length": String(50 * 1024 * 1024) });
    await expectRefused(res, 413, "request:too-large", /The backup file is 50 MB; the limit is 5 MB/, before);
    // A stream may pull ahead a little of its own accord; it is never read through.
    expect(pulled).toBeLessThan(1024 * 1024);
  });

  it("a 50 MB upload without a declared size is cut off just past the limit", async () => {
    const before = await fingerprint();
    let pulled = 0;
    const chunk = new Uint8Array(64 * 1024).fill(0x20);
    const body = new ReadableStream<Uint8Array>({
      pull(controller) {
        pulled += chunk.byteLength;
        if (pulled > 50 * 1024 * 1024) controller.close();
        else controller.enqueue(chunk);
      },
    });
    const res = await restore(body);
    await expectRefused(res, 413, "request:too-large", /larger than the limit of 5 MB/, before);
    expect(pulled).toBeLessThan(6 * 1024 * 1024);
  });

  it("a multipart upload (the page's form) works, and a form without the file is named", async () => {
    const form = new FormData();
    form.set("file", new Blob([JSON.stringify(good)], { type: "application/json" }), "backup.json");
    const request = new Request("http://localhost:3000/x", { method: "POST", body: form });
    const res = await sendRaw(previewRoute, {
      path: `/api/homes/${homeId}/backup/preview`,
      params: { homeId },
      cookie,
      body: await request.arrayBuffer(),
      headers: { "content-type": request.headers.get("content-type")! },
    });
    expect(res.status, res.text).toBe(200);

    const empty = new FormData();
    empty.set("note", "no file here");
    const r2 = new Request("http://localhost:3000/x", { method: "POST", body: empty });
    const before = await fingerprint();
    const res2 = await restore(await r2.arrayBuffer(), { "content-type": r2.headers.get("content-type")! });
    await expectRefused(res2, 400, "request:invalid", /Choose a backup file/, before);
  });
});

describe("older schema versions are migrated", () => {
  /** The version-0 shape (lib/validation/backup.ts): exportedAt, volume.{ceiling,turnOn}, offsetDb; no hash, no templates. */
  function asVersion0(file: BackupFile) {
    return {
      format: file.format,
      schemaVersion: 0,
      exportedAt: file.createdAt,
      home: file.home,
      zones: file.zones.map((z) => {
        const { schema: _schema, volumeCeiling, turnOnVolume, ...config } = z.config;
        return {
          id: z.id,
          position: z.position,
          device: z.device,
          config: {
            ...config,
            volume: { ceiling: volumeCeiling, turnOn: turnOnVolume },
            sources: config.sources.map(({ loudnessOffsetDb, ...s }) => ({ ...s, offsetDb: loudnessOffsetDb })),
            presets: config.presets.map(({ loudnessOffsetDb, ...p }) => ({ ...p, offsetDb: loudnessOffsetDb })),
          },
        };
      }),
      curves: file.curves,
    };
  }

  it("a version-0 file previews as migrated and restores the same configuration", async () => {
    const v0 = asVersion0(good);
    const preview = await sendRaw(previewRoute, {
      path: `/api/homes/${homeId}/backup/preview`,
      params: { homeId },
      cookie,
      body: JSON.stringify(v0),
      headers: { "content-type": "application/json" },
    });
    expect(preview.status, preview.text).toBe(200);
    expect(preview.json.backup).toMatchObject({ schemaVersion: 0, migratedFrom: 0 });
    const res = await restore(JSON.stringify(v0));
    expect(res.status, res.text).toBe(200);
    for (const z of good.zones) {
      const [latest] = await query<{ content_hash: string }>("select content_hash from zone_revisions where zone_id = $1 order by number desc limit 1", [z.id]);
      expect(latest.content_hash).toBe(z.revision!.contentHash);
    }
    const [audit] = await query<{ changes: unknown }>("select changes from audit_events where kind = 'home.backup-restored' order by id desc limit 1");
    expect(audit.changes).toEqual(expect.arrayContaining([{ field: "schemaVersion", before: 0, after: 1 }]));
  });

  it("a version-0 file with a bad field names it (after migration) and writes nothing", async () => {
    const v0 = asVersion0(good);
    (v0.zones[1].config.volume as Record<string, unknown>).ceiling = "high";
    const before = await fingerprint();
    const res = await restore(JSON.stringify(v0));
    await expectRefused(res, 422, "backup:invalid", /after migrating it from schema version 0.*zones\[1\]\.config\.volumeCeiling/, before);
  });
});

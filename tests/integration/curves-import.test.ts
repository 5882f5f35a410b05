// Importing a tone curve from our JSON or CSV format (multipart upload): every
// error names the line (CSV) or band (JSON) and the field, and on any error
// nothing is saved — no curve, no band, no audit event.
import { describe, expect, it } from "vitest";
import { POST as importRoute } from "@/app/api/curves/import/route";
import { people } from "./helpers/http";
import { count, upload } from "./helpers/audio";

const enc = (s: string) => new TextEncoder().encode(s);

function importAs(email: string, file: { name: string; bytes: Uint8Array } | undefined, fields: Record<string, string> = { name: "Imported" }, headers?: Record<string, string>) {
  return upload(importRoute, { path: "/api/curves/import", params: {}, email, file, fields, headers });
}

async function nothingSaved<T>(fn: () => Promise<T>): Promise<T> {
  const before = [await count("select 1 from tone_curves"), await count("select 1 from tone_curve_bands"), await count("select 1 from audit_events")];
  const result = await fn();
  expect([await count("select 1 from tone_curves"), await count("select 1 from tone_curve_bands"), await count("select 1 from audit_events")]).toEqual(before);
  return result;
}

describe("POST /api/curves/import", () => {
  it("imports a CSV with an enabled column into a new curve (201, audited)", async () => {
    const csv = "type,frequency_hz,gain_db,q,enabled\nhighpass,30,0,0.707,true\npeaking,250,-3,2,false\nhighshelf,8000,2,0.707,true\n";
    const res = await importAs(people.integrator, { name: "den.csv", bytes: enc(csv) }, { name: "Den voicing", description: "From the site visit" });
    expect(res.status).toBe(201);
    expect(res.json).toMatchObject({ name: "Den voicing", description: "From the site visit", bandCount: 3 });
    expect((res.json.bands as { enabled: boolean }[]).map((b) => b.enabled)).toEqual([true, false, true]);
    expect(await count("select 1 from audit_events where kind = 'curve.imported' and summary like '%den.csv%'")).toBe(1);
  });

  it("imports our JSON format", async () => {
    const json = JSON.stringify({ bands: [{ type: "lowshelf", frequencyHz: 80, gainDb: 4, q: 0.707 }] });
    const res = await importAs(people.owner, { name: "lift.json", bytes: enc(json) }, { name: "Lift" });
    expect(res.status).toBe(201);
    expect(res.json.bands).toEqual([{ type: "lowshelf", frequencyHz: 80, gainDb: 4, q: 0.707, enabled: true }]);
  });

  it("a bad CSV names each line and column, and saves nothing", async () => {
    const csv = "type,frequency_hz,gain_db,q\npeaking,1000,2,1\npeaking,2000,loud,1\nshelf,3000,1,1\npeaking,5,1,1\n";
    const res = await nothingSaved(() => importAs(people.integrator, { name: "bad.csv", bytes: enc(csv) }));
    expect(res.status).toBe(422);
    expect(res.json.error?.code).toBe("curve:import-invalid");
    // Number errors come first (line 3); the band rules run once every cell is a number.
    expect(res.json.error?.fieldErrors?.file).toEqual(['Line 3, gain_db: "loud" is not a number.']);
    expect(res.json.error?.message).toMatch(/^bad\.csv could not be imported: Line 3, gain_db/);

    const rules = await nothingSaved(() =>
      importAs(people.integrator, { name: "rules.csv", bytes: enc("type,frequency_hz,gain_db,q\nshelf,3000,1,1\npeaking,5,1,1\npeaking,100,14,1\n") }),
    );
    expect(rules.status).toBe(422);
    const messages = rules.json.error!.fieldErrors!.file!;
    expect(messages).toContainEqual(expect.stringMatching(/^Line 2, type: Type must be one of/));
    expect(messages).toContainEqual("Line 3, frequency_hz: Frequency must be at least 10 Hz.");
    expect(messages).toContainEqual("Line 4, gain_db: Gain must be at most +12 dB.");
  });

  it("a CSV with a wrong header or a short row is refused", async () => {
    const header = await nothingSaved(() => importAs(people.integrator, { name: "h.csv", bytes: enc("kind,hz,gain\npeaking,100,1\n") }));
    expect(header.status).toBe(422);
    expect(header.json.error?.fieldErrors?.file?.[0]).toMatch(/^Line 1 \(header\): missing columns type, frequency_hz, gain_db, q/);
    const short = await nothingSaved(() => importAs(people.integrator, { name: "s.csv", bytes: enc("type,frequency_hz,gain_db,q\npeaking,100,1\n") }));
    expect(short.json.error?.fieldErrors?.file).toEqual(["Line 2: expected 4 values, found 3."]);
  });

  it("a bad JSON file names the band and field; broken JSON says so", async () => {
    const json = JSON.stringify({ bands: [{ type: "peaking", frequencyHz: 100, gainDb: 1, q: 1 }, { type: "peaking", frequencyHz: 200, gainDb: -30, q: 1 }] });
    const res = await nothingSaved(() => importAs(people.integrator, { name: "b.json", bytes: enc(json) }));
    expect(res.json.error?.fieldErrors?.file).toEqual(["Band 2 gain: Gain must be at least -24 dB."]);
    const broken = await nothingSaved(() => importAs(people.integrator, { name: "c.json", bytes: enc("{ bands: [") }));
    expect(broken.status).toBe(422);
    expect(broken.json.error?.fieldErrors?.file?.[0]).toMatch(/^Not valid JSON/);
  });

  it("more bands than any device takes, a binary file, a missing name or a missing file are refused", async () => {
    const rows = Array.from({ length: 11 }, (_, i) => `peaking,${100 * (i + 1)},1,1`).join("\n");
    const many = await nothingSaved(() => importAs(people.integrator, { name: "m.csv", bytes: enc(`type,frequency_hz,gain_db,q\n${rows}\n`) }));
    expect(many.json.error?.fieldErrors?.file).toEqual(["A tone curve has at most 10 bands."]);
    const binary = await nothingSaved(() => importAs(people.integrator, { name: "x.csv", bytes: Uint8Array.from([0xff, 0xfe, 0x00, 0xc3, 0x28]) }));
    expect(binary.status).toBe(422);
    expect(binary.json.error?.message).toMatch(/not text/);
    const noName = await nothingSaved(() => importAs(people.integrator, { name: "n.csv", bytes: enc("type,frequency_hz,gain_db,q\n") }, {}));
    expect(noName.status).toBe(400);
    expect(noName.json.error?.fieldErrors?.name).toBeDefined();
    const noFile = await nothingSaved(() => importAs(people.integrator, undefined));
    expect(noFile.status).toBe(400);
    expect(noFile.json.error?.fieldErrors?.file).toEqual(["Choose a file."]);
  });

  it("refuses an oversized upload from its Content-Length before reading it", async () => {
    const res = await nothingSaved(() =>
      importAs(people.integrator, { name: "big.csv", bytes: enc("type,frequency_hz,gain_db,q\n") }, { name: "Big" }, { "content-length": String(10 * 1024 * 1024) }),
    );
    expect(res.status).toBe(413);
    expect(res.json.error?.message).toMatch(/limit is 256 KB/);
  });

  it("installers and support may not import", async () => {
    for (const email of [people.installer, people.support]) {
      const res = await nothingSaved(() => importAs(email, { name: "ok.csv", bytes: enc("type,frequency_hz,gain_db,q\npeaking,100,1,1\n") }));
      expect(res.status).toBe(403);
    }
  });
});

import * as wavefileModule from "wavefile";
import { query } from "./database";
import { signInAs } from "./http";

// Helpers for the tone-curve, level-match and layout integration tests:
// WAV clips generated with wavefile, multipart uploads sent to route handlers
// the way a browser sends them, and rows read straight from the database.

type WaveFileClass = typeof wavefileModule.WaveFile;
const WaveFile: WaveFileClass =
  (Reflect.get(wavefileModule, "WaveFile") as WaveFileClass | undefined) ??
  (Reflect.get(wavefileModule, "default") as { WaveFile: WaveFileClass }).WaveFile;

/** A stereo 1 kHz sine at `levelDbfs` peak per channel (EBU Tech 3341 style), 24-bit PCM. */
export function sineWav(levelDbfs: number, seconds: number, sampleRate = 48_000, frequencyHz = 1000): Uint8Array {
  const amp = Math.pow(10, levelDbfs / 20);
  const n = Math.round(seconds * sampleRate);
  const samples = Array.from({ length: n }, (_, i) => Math.round(amp * Math.sin((2 * Math.PI * frequencyHz * i) / sampleRate) * 8388607));
  const wav = new WaveFile();
  wav.fromScratch(2, sampleRate, "24", [samples, samples]);
  return wav.toBuffer();
}

type RouteFn = (request: Request, context: { params: Promise<Record<string, string>> }) => Promise<Response>;

export interface UploadOptions {
  path: string;
  params: Record<string, string>;
  email: string;
  file?: { name: string; bytes: Uint8Array; type?: string };
  fields?: Record<string, string>;
  /** Extra headers, e.g. a declared content-length. */
  headers?: Record<string, string>;
  /** A raw body instead of a form (for streamed oversize uploads). */
  rawBody?: { stream: ReadableStream<Uint8Array>; contentType: string };
}

export async function upload(handler: RouteFn, options: UploadOptions) {
  const cookie = await signInAs(options.email);
  const headers = new Headers({ accept: "application/json", cookie, ...options.headers });
  let body: BodyInit;
  if (options.rawBody) {
    headers.set("content-type", options.rawBody.contentType);
    body = options.rawBody.stream;
  } else {
    const form = new FormData();
    for (const [k, v] of Object.entries(options.fields ?? {})) form.set(k, v);
    if (options.file) form.set("file", new Blob([options.file.bytes as BlobPart], { type: options.file.type ?? "application/octet-stream" }), options.file.name);
    body = form;
  }
  const request = new Request(`http://localhost:3000${options.path}`, { method: "POST", headers, body, duplex: "half" } as RequestInit);
  const response = await handler(request, { params: Promise.resolve(options.params) });
  const text = await response.text();
  let json: unknown = null;
  try {
    json = text ? JSON.parse(text) : null;
  } catch {
    json = text;
  }
  return { status: response.status, headers: response.headers, text, json: json as Record<string, unknown> & { error?: { code: string; message: string; fieldErrors?: Record<string, string[]>; details?: Record<string, unknown> } } };
}

/** A multipart body streamed lazily: a form header, `megabytes` of zeros as the file, the closing boundary. */
export function hugeMultipart(megabytes: number, fields: Record<string, string>) {
  const boundary = "----zwtestboundary";
  const enc = new TextEncoder();
  const head =
    Object.entries(fields)
      .map(([k, v]) => `--${boundary}\r\nContent-Disposition: form-data; name="${k}"\r\n\r\n${v}\r\n`)
      .join("") + `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="huge.wav"\r\nContent-Type: audio/wav\r\n\r\n`;
  let sent = -1;
  let pulled = 0;
  const chunk = new Uint8Array(1024 * 1024);
  const stream = new ReadableStream<Uint8Array>({
    pull(controller) {
      pulled++;
      if (sent < 0) {
        controller.enqueue(enc.encode(head));
        sent = 0;
      } else if (sent < megabytes) {
        controller.enqueue(chunk);
        sent++;
      } else {
        controller.enqueue(enc.encode(`\r\n--${boundary}--\r\n`));
        controller.close();
      }
    },
  });
  return { stream, contentType: `multipart/form-data; boundary=${boundary}`, pulledChunks: () => pulled };
}

export async function zoneId(homeName: string, zoneName: string) {
  const [row] = await query<{ id: string; version: number; home_id: string }>(
    "select z.id, z.version, z.home_id from zones z join homes h on h.id = z.home_id where h.name = $1 and z.name = $2",
    [homeName, zoneName],
  );
  if (!row) throw new Error(`no zone ${homeName} / ${zoneName}`);
  return { id: row.id, version: row.version, homeId: row.home_id };
}

export async function curveByName(name: string) {
  const [row] = await query<{ id: string; version: number }>("select id, version from tone_curves where name = $1", [name]);
  if (!row) throw new Error(`no curve ${name}`);
  return row;
}

export async function count(sql: string, params: unknown[] = []) {
  const [row] = await query<{ n: number }>(`select count(*)::int as n from (${sql}) t`, params);
  return row!.n;
}

export async function latestAudit(kind: string) {
  const [row] = await query<{ kind: string; summary: string; zone_id: string | null; actor_role: string; changes: { field: string; before: unknown; after: unknown }[] }>(
    "select kind, summary, zone_id, actor_role, changes from audit_events where kind = $1 order by created_at desc, id desc limit 1",
    [kind],
  );
  return row;
}

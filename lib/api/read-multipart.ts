import "server-only";
import { AppError, type ErrorCode } from "@/lib/errors";

// Reads one uploaded file (plus the form's text fields) from a multipart
// request without trusting its size: a declared Content-Length over the limit
// is refused before a byte is read, and the body is read only until it passes
// the limit, then the stream is cancelled — so an oversized upload costs
// neither memory nor decoding. Bytes, not text: tone-curve files and WAV clips
// both come through here.

export interface MultipartFile {
  name: string;
  bytes: Uint8Array;
}

export interface MultipartUpload {
  file: MultipartFile;
  fields: Record<string, string>;
}

/** Boundaries and part headers around the file and a few short fields. */
const MULTIPART_OVERHEAD = 16 * 1024;

export function formatBytes(n: number): string {
  if (n < 1024) return `${n} bytes`;
  if (n < 1024 * 1024) return `${(n / 1024).toFixed(n < 10 * 1024 ? 1 : 0).replace(/\.0$/, "")} KB`;
  return `${(n / (1024 * 1024)).toFixed(1).replace(/\.0$/, "")} MB`;
}

export function tooLarge(maxBytes: number, what: string, size?: number): AppError {
  return new AppError("request:too-large", {
    message: size
      ? `The ${what} is ${formatBytes(size)}; the limit is ${formatBytes(maxBytes)}. Nothing was read or stored.`
      : `The ${what} is larger than the limit of ${formatBytes(maxBytes)}. Nothing was stored.`,
    details: { maxBytes },
  });
}

/** The whole body, or `onTooLarge()` as soon as it passes `limit` bytes (the rest is never read). */
export async function readBounded(body: ReadableStream<Uint8Array>, limit: number, onTooLarge: () => AppError): Promise<Uint8Array> {
  const reader = body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > limit) {
      await reader.cancel("upload too large").catch(() => {});
      throw onTooLarge();
    }
    chunks.push(value);
  }
  const out = new Uint8Array(total);
  let offset = 0;
  for (const c of chunks) {
    out.set(c, offset);
    offset += c.byteLength;
  }
  return out;
}

/**
 * The file in form field `field` and the other (text) fields. `what` names the
 * file in messages ("clip", "tone-curve file").
 */
export async function readMultipartFile(
  request: Request,
  { maxBytes, field = "file", what = "file", emptyCode = "request:invalid" }: { maxBytes: number; field?: string; what?: string; emptyCode?: ErrorCode },
): Promise<MultipartUpload> {
  const contentType = request.headers.get("content-type") ?? "";
  if (!contentType.toLowerCase().startsWith("multipart/form-data")) {
    await request.body?.cancel().catch(() => {});
    throw new AppError("request:invalid", {
      message: `Upload the ${what} as a form (multipart/form-data) with the file in “${field}”.`,
      fieldErrors: { [field]: ["Choose a file."] },
    });
  }
  const limit = maxBytes + MULTIPART_OVERHEAD;
  const declared = Number(request.headers.get("content-length"));
  if (Number.isFinite(declared) && declared > limit) {
    await request.body?.cancel().catch(() => {});
    throw tooLarge(maxBytes, what, declared);
  }
  if (!request.body) throw new AppError("request:invalid", { message: `No ${what} was uploaded.`, fieldErrors: { [field]: ["Choose a file."] } });
  const raw = await readBounded(request.body, limit, () => tooLarge(maxBytes, what));

  let form: FormData;
  try {
    form = await new Response(raw as BodyInit, { headers: { "content-type": contentType } }).formData();
  } catch {
    throw new AppError("request:invalid", { message: "The upload form could not be read. Choose the file again." });
  }
  const file = form.get(field);
  if (!file || typeof file === "string") {
    throw new AppError("request:invalid", { message: `Choose a ${what} to upload.`, fieldErrors: { [field]: ["Choose a file."] } });
  }
  if (file.size > maxBytes) throw tooLarge(maxBytes, what, file.size);
  if (file.size === 0) {
    throw new AppError(emptyCode, { message: `The chosen ${what} is empty.`, fieldErrors: { [field]: ["The file is empty."] } });
  }
  const fields: Record<string, string> = {};
  for (const [k, v] of form.entries()) if (typeof v === "string") fields[k] = v;
  return { file: { name: file.name || what, bytes: new Uint8Array(await file.arrayBuffer()) }, fields };
}

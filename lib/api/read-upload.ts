import "server-only";
import { AppError } from "@/lib/errors";

// Reads an uploaded file from a request without trusting its size: a declared
// Content-Length over the limit is refused before a byte is read, and a body
// without one is read only until it passes the limit, then the stream is
// cancelled. Accepts a multipart form (the file in `field`) or the file as the
// raw body (JSON).

export interface Upload {
  text: string;
  bytes: number;
  filename: string | null;
  /** Other text fields of a multipart form. */
  fields: Record<string, string>;
}

// A multipart envelope adds boundaries and part headers around the file.
const MULTIPART_OVERHEAD = 64 * 1024;

function megabytes(n: number) {
  return `${(n / (1024 * 1024)).toFixed(1).replace(/\.0$/, "")} MB`;
}

function tooLarge(maxBytes: number, size?: number): AppError {
  return new AppError("request:too-large", {
    message: size
      ? `The file is ${megabytes(size)}; the limit is ${megabytes(maxBytes)}. Nothing was read or changed.`
      : `The file is larger than the limit of ${megabytes(maxBytes)}. Nothing was changed.`,
    details: { maxBytes },
  });
}

async function readBounded(body: ReadableStream<Uint8Array>, limit: number, maxBytes: number): Promise<Uint8Array> {
  const reader = body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > limit) {
      await reader.cancel("upload too large").catch(() => {});
      throw tooLarge(maxBytes);
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

function decodeUtf8(bytes: Uint8Array): string {
  try {
    return new TextDecoder("utf-8", { fatal: true, ignoreBOM: false }).decode(bytes);
  } catch {
    throw new AppError("backup:invalid", { message: "The file is not UTF-8 text; a backup is a JSON file." });
  }
}

export async function readUpload(request: Request, { maxBytes, field = "file" }: { maxBytes: number; field?: string }): Promise<Upload> {
  const contentType = request.headers.get("content-type") ?? "";
  const multipart = contentType.toLowerCase().startsWith("multipart/form-data");
  const limit = multipart ? maxBytes + MULTIPART_OVERHEAD : maxBytes;
  const declared = Number(request.headers.get("content-length"));
  if (Number.isFinite(declared) && declared > limit) {
    // Refused unread; the client stops sending when the connection answers.
    await request.body?.cancel().catch(() => {});
    throw tooLarge(maxBytes, declared);
  }
  if (!request.body) throw new AppError("backup:invalid", { message: "No file was uploaded." });
  const bytes = await readBounded(request.body, limit, maxBytes);

  if (!multipart) {
    if (bytes.byteLength === 0) throw new AppError("backup:invalid", { message: "No file was uploaded." });
    return { text: decodeUtf8(bytes), bytes: bytes.byteLength, filename: null, fields: {} };
  }

  let form: FormData;
  try {
    form = await new Response(bytes as BodyInit, { headers: { "content-type": contentType } }).formData();
  } catch {
    throw new AppError("request:invalid", { message: "The upload form could not be read. Choose the file again." });
  }
  const file = form.get(field);
  if (!file || typeof file === "string") {
    throw new AppError("request:invalid", { message: `Choose a backup file to upload (form field “${field}”).`, fieldErrors: { [field]: ["Choose a file."] } });
  }
  if (file.size > maxBytes) throw tooLarge(maxBytes, file.size);
  if (file.size === 0) throw new AppError("backup:invalid", { message: "The chosen file is empty." });
  const fields: Record<string, string> = {};
  for (const [k, v] of form.entries()) if (typeof v === "string") fields[k] = v;
  return { text: decodeUtf8(new Uint8Array(await file.arrayBuffer())), bytes: file.size, filename: file.name || null, fields };
}

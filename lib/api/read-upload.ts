import "server-only";
import { AppError } from "@/lib/errors";
import { readBounded, readMultipartFile, tooLarge } from "@/lib/api/read-multipart";

// A text file upload (a home backup): a multipart form with the file in
// `field` (the page's form), or the file as the raw body. Size limits as in
// read-multipart.ts: refused before reading when the declared length is over,
// and the stream cancelled as soon as it passes the limit.

export interface Upload {
  text: string;
  bytes: number;
  filename: string | null;
  /** Other text fields of a multipart form. */
  fields: Record<string, string>;
}

const what = "backup file";

function decodeUtf8(bytes: Uint8Array): string {
  try {
    return new TextDecoder("utf-8", { fatal: true, ignoreBOM: false }).decode(bytes);
  } catch {
    throw new AppError("backup:invalid", { message: "The file is not UTF-8 text; a backup is a JSON file." });
  }
}

export async function readUpload(request: Request, { maxBytes, field = "file" }: { maxBytes: number; field?: string }): Promise<Upload> {
  const contentType = request.headers.get("content-type") ?? "";
  if (contentType.toLowerCase().startsWith("multipart/form-data")) {
    const { file, fields } = await readMultipartFile(request, { maxBytes, field, what, emptyCode: "backup:invalid" });
    return { text: decodeUtf8(file.bytes), bytes: file.bytes.byteLength, filename: file.name, fields };
  }
  const declared = Number(request.headers.get("content-length"));
  if (Number.isFinite(declared) && declared > maxBytes) {
    // Refused unread; the client stops sending when the connection answers.
    await request.body?.cancel().catch(() => {});
    throw tooLarge(maxBytes, what, declared);
  }
  if (!request.body) throw new AppError("backup:invalid", { message: "No file was uploaded." });
  const bytes = await readBounded(request.body, maxBytes, () => tooLarge(maxBytes, what));
  if (bytes.byteLength === 0) throw new AppError("backup:invalid", { message: "No file was uploaded." });
  return { text: decodeUtf8(bytes), bytes: bytes.byteLength, filename: null, fields: {} };
}

import { assertClipTarget, listClips, loadZoneForClipUpload, storeClipMeasurement } from "@/db/queries/level-match";
import { apiHandler, parseOrThrow } from "@/lib/api/handler";
import { readMultipartFile } from "@/lib/api/read-multipart";
import { AudioDecodeError, decodeWav } from "@/lib/audio/decode";
import { measureLoudness } from "@/lib/audio/loudness";
import { AppError } from "@/lib/errors";
import { zoneParamsSchema } from "@/lib/validation/board";
import { CLIP_LIMITS, clipFieldsSchema, clipsListQuerySchema } from "@/lib/validation/level-match";

// Level-match clips of a zone. GET: the measurements, newest first (zone:read).
export const GET = apiHandler({ params: zoneParamsSchema, query: clipsListQuerySchema }, async ({ actor, params, query }) =>
  listClips({ actor, zoneId: params.zoneId, limit: query.limit }),
);

// POST multipart { file: WAV, sourceId | presetId } (zone:edit): the zone and
// role are checked before a byte of the upload is read; the size is checked
// from Content-Length and again while the body streams in; the WAV is decoded
// and measured (BS.1770-4 / EBU R 128) in memory, and only the measurement is
// stored. On any error nothing is stored.
export const POST = apiHandler({ params: zoneParamsSchema, status: 201 }, async ({ request, actor, params }) => {
  let zone;
  try {
    zone = await loadZoneForClipUpload({ actor, zoneId: params.zoneId });
  } catch (error) {
    await request.body?.cancel().catch(() => {});
    throw error;
  }
  const upload = await readMultipartFile(request, { maxBytes: CLIP_LIMITS.maxBytes, what: "clip" });
  const fields = parseOrThrow(clipFieldsSchema, upload.fields);
  const target = fields.sourceId ? { kind: "source" as const, id: fields.sourceId } : { kind: "preset" as const, id: fields.presetId! };
  await assertClipTarget({ zoneId: zone.id, ...target });
  let measurement;
  try {
    const wav = decodeWav(upload.file.bytes, { maxBytes: CLIP_LIMITS.maxBytes, maxDurationSeconds: CLIP_LIMITS.maxSeconds });
    measurement = measureLoudness(wav.channels, wav.sampleRate);
  } catch (error) {
    if (error instanceof AudioDecodeError) {
      throw new AppError("clip:invalid", {
        message: `${upload.file.name}: ${error.message} Nothing was stored.`,
        fieldErrors: { file: [error.message] },
        details: { reason: error.code },
      });
    }
    throw error;
  }
  return storeClipMeasurement({ actor, zone, target, fileName: upload.file.name, measurement });
});

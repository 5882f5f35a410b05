import { restoreHomeBackup } from "@/db/queries/backup";
import { getHomeForActor } from "@/db/queries/homes";
import { apiHandler } from "@/lib/api/handler";
import { readUpload } from "@/lib/api/read-upload";
import { AppError } from "@/lib/errors";
import { can } from "@/lib/permissions";
import { BACKUP_MAX_BYTES, parseBackupText } from "@/lib/validation/backup";
import { homeIdParamsSchema } from "@/lib/validation/homes";
import { z } from "zod";

const restoreQuerySchema = z.object({
  /** The preview's token; when given, a change to the home since the preview refuses the restore. */
  previewToken: z.string().regex(/^[0-9a-f]{32}$/, "That is not a preview token.").optional(),
});

// Apply an uploaded backup to the home: every zone in ONE transaction, or nothing.
// Body: multipart form with the file in "file" (and optionally "previewToken"), or the backup JSON itself.
export const POST = apiHandler({ params: homeIdParamsSchema, query: restoreQuerySchema }, async ({ request, actor, params, query }) => {
  const home = await getHomeForActor({ actor, homeId: params.homeId });
  if (!can(actor, "backup:restore", home)) throw new AppError("auth:forbidden", { message: "Your role may not restore home backups." });
  const upload = await readUpload(request, { maxBytes: BACKUP_MAX_BYTES });
  const token = query.previewToken ?? upload.fields.previewToken ?? null;
  if (token !== null && !/^[0-9a-f]{32}$/.test(token)) throw new AppError("request:invalid", { fieldErrors: { previewToken: ["That is not a preview token."] } });
  return restoreHomeBackup({ actor, homeId: params.homeId, parsed: parseBackupText(upload.text), previewToken: token });
});

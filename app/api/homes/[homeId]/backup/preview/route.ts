import { previewHomeRestore } from "@/db/queries/backup";
import { getHomeForActor } from "@/db/queries/homes";
import { apiHandler } from "@/lib/api/handler";
import { readUpload } from "@/lib/api/read-upload";
import { AppError } from "@/lib/errors";
import { can } from "@/lib/permissions";
import { BACKUP_MAX_BYTES, parseBackupText } from "@/lib/validation/backup";
import { homeIdParamsSchema } from "@/lib/validation/homes";

// What restoring an uploaded backup would change, zone by zone. Writes nothing.
// Body: multipart form with the file in "file", or the backup JSON itself.
export const POST = apiHandler({ params: homeIdParamsSchema }, async ({ request, actor, params }) => {
  // Role and tenant first: an upload is read only for someone who may restore.
  const home = await getHomeForActor({ actor, homeId: params.homeId });
  if (!can(actor, "backup:restore", home)) throw new AppError("auth:forbidden", { message: "Your role may not restore home backups." });
  const upload = await readUpload(request, { maxBytes: BACKUP_MAX_BYTES });
  return previewHomeRestore({ actor, homeId: params.homeId, parsed: parseBackupText(upload.text) });
});

import { getLayout, saveLayout } from "@/db/queries/layout";
import { apiHandler } from "@/lib/api/handler";
import { zoneParamsSchema } from "@/lib/validation/board";
import { layoutSaveSchema } from "@/lib/validation/layout";

// GET: the zone's output layout with its device's limits and its tone curve (zone:read).
export const GET = apiHandler({ params: zoneParamsSchema }, async ({ actor, params }) => getLayout({ actor, zoneId: params.zoneId }));

// PUT { version, layout }: the whole layout (zone:edit; 409 zone:stale on a
// stale version; 422 zone:rule when the device has fewer outputs).
export const PUT = apiHandler({ params: zoneParamsSchema, body: layoutSaveSchema }, async ({ actor, params, body }) =>
  saveLayout({ actor, zoneId: params.zoneId, version: body.version, layout: body.layout }),
);

import { lockGuestControls, unlockGuestControls } from "@/db/queries/board";
import { apiHandler } from "@/lib/api/handler";
import { guestLockSchema, guestUnlockSchema, zoneParamsSchema } from "@/lib/validation/board";

// Support locks a zone's guest controls with a reason (optionally setting them
// as part of the fix); unlocking needs a reason too. Both are audited.
export const POST = apiHandler({ params: zoneParamsSchema, body: guestLockSchema }, async ({ actor, params, body }) =>
  lockGuestControls({ actor, zoneId: params.zoneId, ...body }),
);

export const DELETE = apiHandler({ params: zoneParamsSchema, body: guestUnlockSchema }, async ({ actor, params, body }) =>
  unlockGuestControls({ actor, zoneId: params.zoneId, ...body }),
);

import { apiHandler } from "@/lib/api/handler";
import { scheduleFirmware } from "@/lib/fleet/firmware-service";
import { appFleetClient } from "@/lib/fleet/fleet";
import { bulkFirmwareBodySchema } from "@/lib/validation/pushes";

// Schedules firmware updates for many devices at once (device:care on each).
// Devices already up to date, or with an update pending, are listed as refused.
export const POST = apiHandler({ body: bulkFirmwareBodySchema, status: 201 }, async ({ actor, body }) =>
  scheduleFirmware({ actor, fleet: appFleetClient(), ...body }),
);

import { loadDeviceForActor } from "@/db/queries/devices";
import { apiHandler } from "@/lib/api/handler";
import { scheduleFirmware } from "@/lib/fleet/firmware-service";
import { appFleetClient } from "@/lib/fleet/fleet";
import { deviceIdParamsSchema, scheduleFirmwareBodySchema } from "@/lib/validation/pushes";

// Schedules a firmware update for one device inside a maintenance window (device:care).
export const POST = apiHandler({ params: deviceIdParamsSchema, body: scheduleFirmwareBodySchema, status: 201 }, async ({ actor, params, body }) => {
  const device = await loadDeviceForActor({ actor, deviceId: params.deviceId, action: "device:care" });
  return scheduleFirmware({ actor, fleet: appFleetClient(), deviceIds: [device.id], ...body });
});

import { getDeviceDetail } from "@/db/queries/devices";
import { apiHandler } from "@/lib/api/handler";
import { firmwareOffer } from "@/lib/fleet/firmware-service";
import { appFleetClient } from "@/lib/fleet/fleet";
import { deviceIdParamsSchema } from "@/lib/validation/pushes";

// One device for support: model profile, firmware (and what the fleet offers),
// last reports and errors, firmware updates, recent pushes.
export const GET = apiHandler({ params: deviceIdParamsSchema }, async ({ actor, params }) => {
  const detail = await getDeviceDetail({ actor, deviceId: params.deviceId });
  const offer = await firmwareOffer(appFleetClient(), {
    fleetDeviceId: detail.fleetDeviceId,
    firmwareVersion: detail.firmwareVersion,
    latestFirmware: detail.model.latestFirmware,
  });
  return { ...detail, firmwareOffer: offer };
});

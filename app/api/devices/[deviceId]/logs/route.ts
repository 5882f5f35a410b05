import { db } from "@/db/client";
import { recordAudit } from "@/db/queries/audit";
import { loadDeviceForActor } from "@/db/queries/devices";
import { apiHandler } from "@/lib/api/handler";
import { AppError } from "@/lib/errors";
import { isFleetError } from "@/lib/fleet/client";
import { appFleetClient } from "@/lib/fleet/fleet";
import { deviceIdParamsSchema } from "@/lib/validation/pushes";

// Fetches the device's log bundle through the fleet API and hands it over as a
// download (device:care: support, integrators, the owner). Recorded in the activity trail.
export const GET = apiHandler({ params: deviceIdParamsSchema }, async ({ actor, params }) => {
  const device = await loadDeviceForActor({ actor, deviceId: params.deviceId, action: "device:care" });
  let text: string;
  try {
    text = await appFleetClient().getLogs(device.fleetDeviceId);
  } catch (error) {
    if (isFleetError(error)) {
      throw new AppError("fleet:unavailable", { message: `The fleet could not hand over the log bundle: ${error.message}` });
    }
    throw error;
  }
  await db.transaction((tx) =>
    recordAudit(tx, actor, {
      kind: "device.logs-fetched",
      summary: `Fetched the log bundle of device ${device.serial}`,
      homeId: device.homeId,
      changes: [{ field: "bytes", before: null, after: Buffer.byteLength(text) }],
    }),
  );
  const stamp = new Date().toISOString().replace(/[:.]/g, "-").slice(0, 19);
  return new Response(text, {
    status: 200,
    headers: {
      "content-type": "text/plain; charset=utf-8",
      "content-disposition": `attachment; filename="${device.serial}-logs-${stamp}.txt"`,
      "cache-control": "no-store",
    },
  });
});

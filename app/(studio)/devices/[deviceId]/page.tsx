import { notFound, redirect } from "next/navigation";
import { DeviceCare } from "@/components/fleet/device-care";
import { SWRProvider } from "@/components/ui/swr-provider";
import { getDeviceDetail } from "@/db/queries/devices";
import { AppError } from "@/lib/errors";
import { firmwareOffer } from "@/lib/fleet/firmware-service";
import { appFleetClient } from "@/lib/fleet/fleet";
import { requirePageActor } from "@/lib/session";
import { deviceIdParamsSchema, deviceUrl, zoneDriftUrl } from "@/lib/validation/pushes";

export const metadata = { title: "Device" };

export default async function DevicePage({ params }: { params: Promise<{ deviceId: string }> }) {
  const parsed = deviceIdParamsSchema.safeParse(await params);
  if (!parsed.success) notFound();
  const actor = await requirePageActor(`/devices/${parsed.data.deviceId}`);
  let detail;
  try {
    detail = await getDeviceDetail({ actor, deviceId: parsed.data.deviceId });
  } catch (error) {
    if (error instanceof AppError && error.code === "device:not-found") notFound();
    if (error instanceof AppError && error.code === "auth:forbidden") redirect("/forbidden");
    throw error;
  }
  const offer = await firmwareOffer(appFleetClient(), {
    fleetDeviceId: detail.fleetDeviceId,
    firmwareVersion: detail.firmwareVersion,
    latestFirmware: detail.model.latestFirmware,
  });
  return (
    <SWRProvider fallback={{ [deviceUrl(detail.id)]: { ...detail, firmwareOffer: offer }, ...(detail.drift ? { [zoneDriftUrl(detail.drift.zoneId)]: detail.drift } : {}) }}>
      <DeviceCare deviceId={detail.id} />
    </SWRProvider>
  );
}

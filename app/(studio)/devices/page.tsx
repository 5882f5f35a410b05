import { DeviceList } from "@/components/fleet/device-list";
import { ForbiddenNotice } from "@/components/ui/forbidden-notice";
import { SWRProvider } from "@/components/ui/swr-provider";
import { listDevices } from "@/db/queries/devices";
import { can, mayEver } from "@/lib/permissions";
import { requirePageActor } from "@/lib/session";
import { deviceListUrl } from "@/lib/validation/pushes";

export const metadata = { title: "Devices" };

export default async function DevicesPage() {
  const actor = await requirePageActor("/devices");
  if (!can(actor, "device:read")) return <ForbiddenNotice />;
  const items = await listDevices({ actor, query: { search: "", outdated: false } });
  return (
    <SWRProvider fallback={{ [deviceListUrl("", false)]: { items } }}>
      <h1 className="text-2xl font-semibold">Devices</h1>
      <p className="text-sm text-slate-600">Every amplifier and streamer the fleet knows for your company, with firmware and connection.</p>
      <DeviceList canCare={mayEver(actor, "device:care")} />
    </SWRProvider>
  );
}

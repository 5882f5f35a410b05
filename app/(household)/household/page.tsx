import { redirect } from "next/navigation";
import { MaintenanceNotice } from "@/components/fleet/maintenance-notice";
import { HouseholdView, householdKey } from "@/components/household/household-view";
import { SWRProvider } from "@/components/ui/swr-provider";
import { listMaintenanceWindows } from "@/db/queries/devices";
import { getHouseholdView } from "@/db/queries/household";
import { requirePageActor } from "@/lib/session";

export const metadata = { title: "Your home" };

export default async function HouseholdPage() {
  const actor = await requirePageActor("/household");
  if (actor.role !== "homeowner") redirect("/homes");
  const view = await getHouseholdView({ actor });
  // Planned firmware updates of the household's devices, in plain words.
  const windows = (await Promise.all(view.homes.map((h) => listMaintenanceWindows({ actor, homeId: h.id })))).flat();
  return (
    <SWRProvider fallback={{ [householdKey]: view }}>
      {windows.length > 0 ? (
        <div className="mb-6">
          <MaintenanceNotice windows={windows} />
        </div>
      ) : null}
      <HouseholdView />
    </SWRProvider>
  );
}

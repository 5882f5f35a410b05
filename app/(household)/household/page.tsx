import { redirect } from "next/navigation";
import { HouseholdView, householdKey } from "@/components/household/household-view";
import { SWRProvider } from "@/components/ui/swr-provider";
import { getHouseholdView } from "@/db/queries/household";
import { requirePageActor } from "@/lib/session";

export const metadata = { title: "Your home" };

export default async function HouseholdPage() {
  const actor = await requirePageActor("/household");
  if (actor.role !== "homeowner") redirect("/homes");
  const view = await getHouseholdView({ actor });
  return (
    <SWRProvider fallback={{ [householdKey]: view }}>
      <HouseholdView />
    </SWRProvider>
  );
}

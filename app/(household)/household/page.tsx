import { redirect } from "next/navigation";
import { ZoneSummaryCard } from "@/components/homes/zone-summary-card";
import { EmptyState } from "@/components/ui/empty-state";
import { listHouseholdHomes } from "@/db/queries/overview";
import { requirePageActor } from "@/lib/session";

export const metadata = { title: "Your home" };

export default async function HouseholdPage() {
  const actor = await requirePageActor("/household");
  if (actor.role !== "homeowner") redirect("/homes");
  const homeList = await listHouseholdHomes({ actor });
  if (homeList.length === 0) {
    return (
      <EmptyState title="No home is linked to your account yet.">
        Your integrator ({actor.organizationName}) can invite you to your home.
      </EmptyState>
    );
  }
  return (
    <div className="space-y-10">
      {homeList.map((home) => (
        <section key={home.id} aria-labelledby={`home-${home.id}`}>
          <h1 id={`home-${home.id}`} className="text-2xl font-semibold">{home.name}</h1>
          <p className="text-sm text-slate-600">Looked after by {actor.organizationName}. This is a read-only view of how your rooms are set up.</p>
          <div className="mt-4 grid gap-4 sm:grid-cols-2">
            {home.zones.map((zone) => <ZoneSummaryCard key={zone.id} zone={zone} showDevice={false} />)}
          </div>
        </section>
      ))}
    </div>
  );
}

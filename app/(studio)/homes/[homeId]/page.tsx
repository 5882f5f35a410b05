import Link from "next/link";
import { notFound } from "next/navigation";
import { ZoneSummaryCard } from "@/components/homes/zone-summary-card";
import { EmptyState } from "@/components/ui/empty-state";
import { getHomeForActor } from "@/db/queries/homes";
import { listZoneSummaries } from "@/db/queries/overview";
import { AppError } from "@/lib/errors";
import { requirePageActor } from "@/lib/session";
import { homeIdParamsSchema } from "@/lib/validation/homes";
import { redirect } from "next/navigation";

export default async function HomePage({ params }: { params: Promise<{ homeId: string }> }) {
  const parsed = homeIdParamsSchema.safeParse(await params);
  if (!parsed.success) notFound();
  const actor = await requirePageActor(`/homes/${parsed.data.homeId}`);
  let home;
  try {
    home = await getHomeForActor({ actor, homeId: parsed.data.homeId });
  } catch (error) {
    if (error instanceof AppError && error.code === "home:not-found") notFound();
    if (error instanceof AppError && error.code === "auth:forbidden") redirect("/forbidden");
    throw error;
  }
  const zoneList = await listZoneSummaries({ actor, homeId: home.id });
  return (
    <div>
      <nav className="text-sm text-slate-500"><Link href="/homes" className="hover:underline">Homes</Link> / {home.name}</nav>
      <h1 className="mt-1 text-2xl font-semibold">{home.name}</h1>
      <p className="text-sm text-slate-600">{home.householdName} · {home.city} · {home.servicePlan} plan</p>
      <div className="mt-6 grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
        {zoneList.map((zone) => <ZoneSummaryCard key={zone.id} zone={zone} showDevice />)}
      </div>
      {zoneList.length === 0 ? <EmptyState title="No zones in this home yet." /> : null}
    </div>
  );
}

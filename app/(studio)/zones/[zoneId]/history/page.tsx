import Link from "next/link";
import { notFound } from "next/navigation";
import { ZoneHistory } from "@/components/history/zone-history";
import { SWRProvider } from "@/components/ui/swr-provider";
import { listRevisions } from "@/db/queries/history";
import { AppError } from "@/lib/errors";
import { requirePageActor } from "@/lib/session";
import { revisionListQuerySchema, revisionListUrl, zoneIdParamsSchema } from "@/lib/validation/history";

export const metadata = { title: "Zone history" };

export default async function ZoneHistoryPage({ params }: { params: Promise<{ zoneId: string }> }) {
  const parsed = zoneIdParamsSchema.safeParse(await params);
  if (!parsed.success) notFound();
  const { zoneId } = parsed.data;
  const actor = await requirePageActor(`/zones/${zoneId}/history`);
  const query = revisionListQuerySchema.parse({});
  let first;
  try {
    first = await listRevisions({ actor, zoneId, query });
  } catch (error) {
    if (error instanceof AppError && (error.code === "zone:not-found" || error.code === "auth:forbidden")) notFound();
    throw error;
  }
  const { zone } = first;
  return (
    <SWRProvider fallback={{ [revisionListUrl(zoneId, query)]: first }}>
      <nav className="text-sm text-slate-500" aria-label="Breadcrumb">
        <Link href="/homes" className="hover:underline">Homes</Link> /{" "}
        <Link href={`/homes/${zone.homeId}`} className="hover:underline">{zone.homeName}</Link> / {zone.name}
      </nav>
      <div className="mt-1 flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 className="text-2xl font-semibold">History of {zone.name}</h1>
          <p className="text-sm text-slate-600">
            Every saved change is an immutable revision of the zone’s whole desired configuration. Compare any two, or restore an earlier one.
          </p>
        </div>
        <Link href={`/homes/${zone.homeId}/activity?zone=${zone.id}`} className="text-sm text-accent-700 hover:underline">
          Who changed what in this zone →
        </Link>
      </div>
      <div className="mt-6">
        <ZoneHistory zoneId={zoneId} />
      </div>
    </SWRProvider>
  );
}

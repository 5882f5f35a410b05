import Link from "next/link";
import { notFound, redirect } from "next/navigation";
import { ActivityView } from "@/components/history/activity-view";
import { HomeZoneHistories } from "@/components/history/home-zone-histories";
import { ForbiddenNotice } from "@/components/ui/forbidden-notice";
import { SWRProvider } from "@/components/ui/swr-provider";
import { activityFacets, listActivity, listHomeZoneHistories } from "@/db/queries/history";
import { getHomeForActor } from "@/db/queries/homes";
import { AppError } from "@/lib/errors";
import { can, mayEver } from "@/lib/permissions";
import { requirePageActor } from "@/lib/session";
import { activityQuerySchema, activityUrl } from "@/lib/validation/history";
import { homeIdParamsSchema } from "@/lib/validation/homes";

export const metadata = { title: "Home history" };

export default async function HomeActivityPage({
  params,
  searchParams,
}: {
  params: Promise<{ homeId: string }>;
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  const parsedParams = homeIdParamsSchema.safeParse(await params);
  if (!parsedParams.success) notFound();
  const { homeId } = parsedParams.data;
  const actor = await requirePageActor(`/homes/${homeId}/activity`);
  let home;
  try {
    home = await getHomeForActor({ actor, homeId });
  } catch (error) {
    if (error instanceof AppError && error.code === "home:not-found") notFound();
    if (error instanceof AppError && error.code === "auth:forbidden") redirect("/forbidden");
    throw error;
  }
  if (!can(actor, "audit:read", home)) return <ForbiddenNotice />;
  const raw = Object.fromEntries(Object.entries(await searchParams).flatMap(([k, v]) => (typeof v === "string" ? [[k, v]] : [])));
  const parsed = activityQuerySchema.safeParse({ ...raw, home: homeId });
  const query = parsed.success ? parsed.data : activityQuerySchema.parse({ home: homeId });
  const [first, facets, zoneHistories] = await Promise.all([
    listActivity({ actor, query }),
    activityFacets({ actor }),
    listHomeZoneHistories({ actor, homeId }),
  ]);
  const zoneName = query.zone ? (zoneHistories.find((z) => z.id === query.zone)?.name ?? null) : null;
  return (
    <SWRProvider fallback={{ [activityUrl(query)]: first }}>
      <nav className="text-sm text-slate-500" aria-label="Breadcrumb">
        <Link href="/homes" className="hover:underline">Homes</Link> /{" "}
        <Link href={`/homes/${home.id}`} className="hover:underline">{home.name}</Link> / History
      </nav>
      <div className="mt-1 flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 className="text-2xl font-semibold">History of {home.name}</h1>
          <p className="text-sm text-slate-600">Every change to this home and its zones, and each zone’s revisions.</p>
        </div>
        {mayEver(actor, "backup:export") ? (
          <Link href={`/homes/${home.id}/backup`} className="text-sm text-accent-700 hover:underline">
            Backup and restore →
          </Link>
        ) : null}
      </div>
      <HomeZoneHistories zones={zoneHistories} />
      <h2 className="mt-8 text-lg font-semibold">Activity</h2>
      <ActivityView facets={facets} initialQuery={query} fixedHomeId={home.id} zoneName={zoneName} />
    </SWRProvider>
  );
}

import { ActivityView } from "@/components/history/activity-view";
import { ForbiddenNotice } from "@/components/ui/forbidden-notice";
import { SWRProvider } from "@/components/ui/swr-provider";
import { activityFacets, listActivity } from "@/db/queries/history";
import { can } from "@/lib/permissions";
import { requirePageActor } from "@/lib/session";
import { activityQuerySchema, activityUrl } from "@/lib/validation/history";

export const metadata = { title: "Activity" };

export default async function ActivityPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const actor = await requirePageActor("/activity");
  if (!can(actor, "audit:read")) return <ForbiddenNotice />;
  const raw = Object.fromEntries(Object.entries(await searchParams).flatMap(([k, v]) => (typeof v === "string" ? [[k, v]] : [])));
  const parsed = activityQuerySchema.safeParse(raw);
  const query = parsed.success ? parsed.data : activityQuerySchema.parse({});
  const [first, facets] = await Promise.all([listActivity({ actor, query }), activityFacets({ actor })]);
  return (
    <SWRProvider fallback={{ [activityUrl(query)]: first }}>
      <h1 className="text-2xl font-semibold">Activity</h1>
      <p className="text-sm text-slate-600">
        Every change by anyone in {actor.organizationName} — who, in which role, when, where, and what changed field by field. Newest first.
      </p>
      <ActivityView facets={facets} initialQuery={query} />
    </SWRProvider>
  );
}

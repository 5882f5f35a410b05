import { SWRProvider } from "@/components/ui/swr-provider";
import { HomesTable } from "@/components/homes/homes-table";
import { listHomes } from "@/db/queries/homes";
import { mayEver } from "@/lib/permissions";
import { requirePageActor } from "@/lib/session";
import { homeListQuerySchema, homeListUrl } from "@/lib/validation/homes";

export const metadata = { title: "Homes" };

export default async function HomesPage() {
  const actor = await requirePageActor("/homes");
  const query = homeListQuerySchema.parse({});
  const first = await listHomes({ actor, query });
  return (
    <SWRProvider fallback={{ [homeListUrl(query)]: first }}>
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 className="text-2xl font-semibold">Homes</h1>
          <p className="text-sm text-slate-600">Client homes of {actor.organizationName}.</p>
        </div>
      </div>
      <HomesTable initialQuery={query} canCreate={mayEver(actor, "home:create")} />
    </SWRProvider>
  );
}

import { NewPushPanel } from "@/components/pushes/new-push-panel";
import { PushList } from "@/components/pushes/push-list";
import { ForbiddenNotice } from "@/components/ui/forbidden-notice";
import { SWRProvider } from "@/components/ui/swr-provider";
import { listPushes, listPushScopes } from "@/db/queries/pushes";
import { can, mayEver } from "@/lib/permissions";
import { pushListUrl } from "@/lib/validation/pushes";
import { requirePageActor } from "@/lib/session";

export const metadata = { title: "Pushes" };

export default async function PushesPage() {
  const actor = await requirePageActor("/pushes");
  if (!can(actor, "push:read")) return <ForbiddenNotice />;
  const mayStart = mayEver(actor, "push:create");
  const [list, scopes] = await Promise.all([listPushes({ actor, query: { page: 1, pageSize: 25 } }), mayStart ? listPushScopes({ actor }) : null]);
  return (
    <SWRProvider fallback={{ [pushListUrl(1)]: list }}>
      <h1 className="text-2xl font-semibold">Pushes</h1>
      <p className="text-sm text-slate-600">Configurations sent to client homes, and how each device answered.</p>
      {scopes ? <NewPushPanel options={scopes} /> : null}
      <PushList />
    </SWRProvider>
  );
}

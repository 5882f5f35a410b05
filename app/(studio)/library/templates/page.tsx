import { LibraryTabs } from "@/components/library/library-tabs";
import { TemplateLibrary, templatesKey } from "@/components/templates/template-library";
import { ForbiddenNotice } from "@/components/ui/forbidden-notice";
import { SWRProvider } from "@/components/ui/swr-provider";
import { listTemplates } from "@/db/queries/templates";
import { can, mayEver } from "@/lib/permissions";
import { requirePageActor } from "@/lib/session";

export const metadata = { title: "Zone templates" };

export default async function ZoneTemplatesPage() {
  const actor = await requirePageActor("/library/templates");
  if (!can(actor, "library:read")) return <ForbiddenNotice />;
  const items = await listTemplates({ actor });
  const rights = {
    canEdit: can(actor, "template:edit"),
    canDuplicate: can(actor, "template:duplicate"),
    canApply: mayEver(actor, "template:apply") || can(actor, "home:create"),
    canPush: mayEver(actor, "push:create"),
  };
  return (
    <div className="space-y-4">
      <LibraryTabs />
      <SWRProvider fallback={{ [templatesKey]: { items } }}>
        <TemplateLibrary rights={rights} />
      </SWRProvider>
    </div>
  );
}

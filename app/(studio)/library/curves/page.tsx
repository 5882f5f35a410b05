import { CurveLibrary } from "@/components/curves/curve-library";
import { LibraryTabs } from "@/components/library/library-tabs";
import { ForbiddenNotice } from "@/components/ui/forbidden-notice";
import { SWRProvider } from "@/components/ui/swr-provider";
import { listCurves } from "@/db/queries/curves";
import { can } from "@/lib/permissions";
import { requirePageActor } from "@/lib/session";
import { curvesUrl } from "@/lib/validation/curves";

export const metadata = { title: "Tone curves" };

export default async function ToneCurvesPage() {
  const actor = await requirePageActor("/library/curves");
  if (!can(actor, "library:read")) return <ForbiddenNotice />;
  const items = await listCurves({ actor });
  return (
    <div className="space-y-4">
      <LibraryTabs />
      <SWRProvider fallback={{ [curvesUrl]: { items } }}>
        <CurveLibrary canEdit={can(actor, "curve:edit")} />
      </SWRProvider>
    </div>
  );
}

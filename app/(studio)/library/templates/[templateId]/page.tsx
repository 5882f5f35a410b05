import { notFound } from "next/navigation";
import { LibraryTabs } from "@/components/library/library-tabs";
import { TemplateDetail } from "@/components/templates/template-detail";
import { ForbiddenNotice } from "@/components/ui/forbidden-notice";
import { SWRProvider } from "@/components/ui/swr-provider";
import { getTemplate, listCurveChoices } from "@/db/queries/templates";
import { AppError } from "@/lib/errors";
import { can, mayEver } from "@/lib/permissions";
import { requirePageActor } from "@/lib/session";
import { templateIdParamsSchema } from "@/lib/validation/templates";

export const metadata = { title: "Zone template" };

export default async function ZoneTemplatePage({ params }: { params: Promise<{ templateId: string }> }) {
  const parsed = templateIdParamsSchema.safeParse(await params);
  if (!parsed.success) notFound();
  const { templateId } = parsed.data;
  const actor = await requirePageActor(`/library/templates/${templateId}`);
  if (!can(actor, "library:read")) return <ForbiddenNotice />;
  let template;
  try {
    template = await getTemplate({ actor, templateId });
  } catch (error) {
    if (error instanceof AppError && error.code === "template:not-found") notFound();
    throw error;
  }
  const rights = {
    canEdit: can(actor, "template:edit"),
    canDuplicate: can(actor, "template:duplicate"),
    canApply: mayEver(actor, "template:apply") || can(actor, "home:create"),
    canPush: mayEver(actor, "push:create"),
  };
  const curves = rights.canEdit ? await listCurveChoices({ actor }) : [];
  return (
    <div className="space-y-4">
      <LibraryTabs />
      <SWRProvider fallback={{ [`/api/templates/${templateId}`]: template }}>
        <TemplateDetail templateId={templateId} rights={rights} curves={curves} />
      </SWRProvider>
    </div>
  );
}

import { notFound } from "next/navigation";
import { PushDetail } from "@/components/pushes/push-detail";
import { ForbiddenNotice } from "@/components/ui/forbidden-notice";
import { SWRProvider } from "@/components/ui/swr-provider";
import { getPushDetail } from "@/db/queries/pushes";
import { AppError } from "@/lib/errors";
import { can } from "@/lib/permissions";
import { requirePageActor } from "@/lib/session";
import { pushDetailUrl, pushIdParamsSchema } from "@/lib/validation/pushes";

export const metadata = { title: "Push" };

export default async function PushPage({ params }: { params: Promise<{ pushId: string }> }) {
  const parsed = pushIdParamsSchema.safeParse(await params);
  if (!parsed.success) notFound();
  const actor = await requirePageActor(`/pushes/${parsed.data.pushId}`);
  if (!can(actor, "push:read")) return <ForbiddenNotice />;
  let detail;
  try {
    detail = await getPushDetail({ actor, pushId: parsed.data.pushId, query: { page: 1, pageSize: 200 } });
  } catch (error) {
    if (error instanceof AppError && error.code === "push:not-found") notFound();
    throw error;
  }
  return (
    <SWRProvider fallback={{ [pushDetailUrl(detail.id)]: detail }}>
      <PushDetail pushId={detail.id} />
    </SWRProvider>
  );
}

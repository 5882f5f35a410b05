import { notFound, redirect } from "next/navigation";
import { OutputLayoutEditor } from "@/components/layout/output-layout-editor";
import { SWRProvider } from "@/components/ui/swr-provider";
import { getLayout } from "@/db/queries/layout";
import { AppError } from "@/lib/errors";
import { requirePageActor } from "@/lib/session";
import { zoneParamsSchema } from "@/lib/validation/board";
import { layoutUrl } from "@/lib/validation/layout";

export const metadata = { title: "Output layout" };

/** Output layout of one zone: outputs, crossover, distances → delays and the summed response. */
export default async function OutputLayoutPage({ params }: { params: Promise<{ zoneId: string }> }) {
  const parsed = zoneParamsSchema.safeParse(await params);
  if (!parsed.success) notFound();
  const actor = await requirePageActor(`/zones/${parsed.data.zoneId}/layout`);
  let dto;
  try {
    dto = await getLayout({ actor, zoneId: parsed.data.zoneId });
  } catch (error) {
    if (error instanceof AppError && error.code === "zone:not-found") notFound();
    if (error instanceof AppError && error.code === "auth:forbidden") redirect("/forbidden");
    throw error;
  }
  return (
    <SWRProvider fallback={{ [layoutUrl(dto.zone.id)]: dto }}>
      <OutputLayoutEditor zoneId={dto.zone.id} />
    </SWRProvider>
  );
}

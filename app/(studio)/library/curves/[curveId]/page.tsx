import { notFound } from "next/navigation";
import { CurveEditor } from "@/components/curves/curve-editor";
import { LibraryTabs } from "@/components/library/library-tabs";
import { ForbiddenNotice } from "@/components/ui/forbidden-notice";
import { SWRProvider } from "@/components/ui/swr-provider";
import { getCurve } from "@/db/queries/curves";
import { AppError } from "@/lib/errors";
import { requirePageActor } from "@/lib/session";
import { curveIdParamsSchema, curveUrl } from "@/lib/validation/curves";

export const metadata = { title: "Tone curve" };

/** One tone curve: band editor with a live response plot, and where it is attached. */
export default async function ToneCurvePage({ params }: { params: Promise<{ curveId: string }> }) {
  const parsed = curveIdParamsSchema.safeParse(await params);
  if (!parsed.success) notFound();
  const actor = await requirePageActor(`/library/curves/${parsed.data.curveId}`);
  let curve;
  try {
    curve = await getCurve({ actor, curveId: parsed.data.curveId });
  } catch (error) {
    if (error instanceof AppError && error.code === "curve:not-found") notFound();
    if (error instanceof AppError && error.code === "auth:forbidden") return <ForbiddenNotice />;
    throw error;
  }
  return (
    <div className="space-y-4">
      <LibraryTabs />
      <SWRProvider fallback={{ [curveUrl(curve.id)]: curve }}>
        <CurveEditor curveId={curve.id} />
      </SWRProvider>
    </div>
  );
}

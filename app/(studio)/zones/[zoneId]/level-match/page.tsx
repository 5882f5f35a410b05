import { notFound, redirect } from "next/navigation";
import { LevelMatchPanel } from "@/components/level-match/level-match-panel";
import { SWRProvider } from "@/components/ui/swr-provider";
import { getLevelMatch } from "@/db/queries/level-match";
import { AppError } from "@/lib/errors";
import { requirePageActor } from "@/lib/session";
import { zoneParamsSchema } from "@/lib/validation/board";
import { levelMatchUrl } from "@/lib/validation/level-match";

export const metadata = { title: "Level match" };

/** Level match of one zone: clips per source and stream preset, suggestions, apply. */
export default async function LevelMatchPage({ params }: { params: Promise<{ zoneId: string }> }) {
  const parsed = zoneParamsSchema.safeParse(await params);
  if (!parsed.success) notFound();
  const actor = await requirePageActor(`/zones/${parsed.data.zoneId}/level-match`);
  let dto;
  try {
    dto = await getLevelMatch({ actor, zoneId: parsed.data.zoneId });
  } catch (error) {
    if (error instanceof AppError && error.code === "zone:not-found") notFound();
    if (error instanceof AppError && error.code === "auth:forbidden") redirect("/forbidden");
    throw error;
  }
  return (
    <SWRProvider fallback={{ [levelMatchUrl(dto.zone.id)]: dto }}>
      <LevelMatchPanel zoneId={dto.zone.id} />
    </SWRProvider>
  );
}

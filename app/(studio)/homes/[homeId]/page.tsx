import Link from "next/link";
import { notFound, redirect } from "next/navigation";
import { ZoneBoard } from "@/components/board/zone-board";
import { PushZoneButton } from "@/components/pushes/push-zone-button";
import { can } from "@/lib/permissions";
import { SWRProvider } from "@/components/ui/swr-provider";
import { getBoard } from "@/db/queries/board";
import { AppError } from "@/lib/errors";
import { requirePageActor } from "@/lib/session";
import { boardUrl } from "@/lib/validation/board";
import { homeIdParamsSchema } from "@/lib/validation/homes";

export const metadata = { title: "Zone board" };

/** The zone board of one home: read here once, then kept fresh by SWR against GET /api/homes/:id/board. */
export default async function HomeBoardPage({ params }: { params: Promise<{ homeId: string }> }) {
  const parsed = homeIdParamsSchema.safeParse(await params);
  if (!parsed.success) notFound();
  const actor = await requirePageActor(`/homes/${parsed.data.homeId}`);
  let board;
  try {
    board = await getBoard({ actor, homeId: parsed.data.homeId });
  } catch (error) {
    if (error instanceof AppError && error.code === "home:not-found") notFound();
    if (error instanceof AppError && error.code === "auth:forbidden") redirect("/forbidden");
    throw error;
  }
  const { home } = board;
  return (
    <SWRProvider fallback={{ [boardUrl(home.id)]: board }}>
      <nav className="text-sm text-slate-500">
        <Link href="/homes" className="hover:underline">Homes</Link> / {home.name}
      </nav>
      <div className="mt-1 flex flex-wrap items-center justify-between gap-3">
        <h1 className="text-2xl font-semibold">{home.name}</h1>
        {can(actor, "push:create", { id: home.id, organizationId: actor.organizationId }) ? (
          <PushZoneButton scope={{ kind: "home", homeId: home.id }} label="Push this home" />
        ) : null}
      </div>
      <p className="mb-4 text-sm text-slate-600">
        {home.householdName} · {home.city} · {home.servicePlan} plan · {board.zones.length} zone{board.zones.length === 1 ? "" : "s"}
        {" · "}
        <Link href={`/homes/${home.id}/activity`} className="text-accent-700 underline underline-offset-2">Activity</Link>
        {" · "}
        <Link href={`/homes/${home.id}/backup`} className="text-accent-700 underline underline-offset-2">Backup and restore</Link>
      </p>
      <ZoneBoard homeId={home.id} />
    </SWRProvider>
  );
}

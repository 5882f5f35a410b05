import Link from "next/link";
import { notFound, redirect } from "next/navigation";
import { BackupPanel } from "@/components/history/backup-panel";
import { ForbiddenNotice } from "@/components/ui/forbidden-notice";
import { getHomeForActor } from "@/db/queries/homes";
import { AppError } from "@/lib/errors";
import { can } from "@/lib/permissions";
import { requirePageActor } from "@/lib/session";
import { BACKUP_MAX_BYTES } from "@/lib/validation/backup";
import { homeIdParamsSchema } from "@/lib/validation/homes";

export const metadata = { title: "Backup and restore" };

export default async function HomeBackupPage({ params }: { params: Promise<{ homeId: string }> }) {
  const parsed = homeIdParamsSchema.safeParse(await params);
  if (!parsed.success) notFound();
  const actor = await requirePageActor(`/homes/${parsed.data.homeId}/backup`);
  let home;
  try {
    home = await getHomeForActor({ actor, homeId: parsed.data.homeId });
  } catch (error) {
    if (error instanceof AppError && error.code === "home:not-found") notFound();
    if (error instanceof AppError && error.code === "auth:forbidden") redirect("/forbidden");
    throw error;
  }
  const canExport = can(actor, "backup:export", home);
  const canRestore = can(actor, "backup:restore", home);
  if (!canExport && !canRestore) return <ForbiddenNotice />;
  return (
    <div>
      <nav className="text-sm text-slate-500" aria-label="Breadcrumb">
        <Link href="/homes" className="hover:underline">Homes</Link> /{" "}
        <Link href={`/homes/${home.id}`} className="hover:underline">{home.name}</Link> / Backup
      </nav>
      <div className="mt-1 flex flex-wrap items-end justify-between gap-3">
        <h1 className="text-2xl font-semibold">Backup and restore — {home.name}</h1>
        <Link href={`/homes/${home.id}/activity`} className="text-sm text-accent-700 hover:underline">History of this home →</Link>
      </div>
      <div className="mt-6">
        <BackupPanel homeId={home.id} homeName={home.name} canExport={canExport} canRestore={canRestore} maxBytes={BACKUP_MAX_BYTES} />
      </div>
    </div>
  );
}

import { exportHomeBackup } from "@/db/queries/backup";
import { apiHandler } from "@/lib/api/handler";
import { homeIdParamsSchema } from "@/lib/validation/homes";

function slug(name: string) {
  return name.toLowerCase().normalize("NFKD").replace(/[^a-z0-9]+/g, "-").replace(/^-|-$/g, "").slice(0, 60) || "home";
}

// Download the whole desired configuration of a home as a versioned JSON file.
export const GET = apiHandler({ params: homeIdParamsSchema }, async ({ actor, params }) => {
  const backup = await exportHomeBackup({ actor, homeId: params.homeId });
  const filename = `zonewright-backup-${slug(backup.home.name)}-${backup.createdAt.slice(0, 10)}.json`;
  return new Response(`${JSON.stringify(backup, null, 2)}\n`, {
    headers: {
      "content-type": "application/json; charset=utf-8",
      "content-disposition": `attachment; filename="${filename}"`,
      "cache-control": "no-store",
      "x-zonewright-content-hash": backup.contentHash,
    },
  });
});

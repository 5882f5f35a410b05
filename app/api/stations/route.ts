import { findStations } from "@/lib/board/station-directory";
import { apiHandler } from "@/lib/api/handler";
import { AppError } from "@/lib/errors";
import { mayEver } from "@/lib/permissions";
import { stationSearchSchema } from "@/lib/validation/board";

// Find internet stations by name or genre in the station directory, to add one
// as a stream preset. Only people who may edit zones search; nothing is saved here.
export const GET = apiHandler({ query: stationSearchSchema }, async ({ actor, query }) => {
  if (!mayEver(actor, "zone:edit")) throw new AppError("auth:forbidden");
  return findStations({ query: query.q, genre: query.genre });
});

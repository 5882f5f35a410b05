import { getHouseholdView } from "@/db/queries/household";
import { apiHandler } from "@/lib/api/handler";

/** The signed-in household's own home(s), in plain words. */
export const GET = apiHandler({}, async ({ actor }) => getHouseholdView({ actor }));

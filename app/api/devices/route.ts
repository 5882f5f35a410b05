import { listDevices } from "@/db/queries/devices";
import { apiHandler } from "@/lib/api/handler";
import { deviceListQuerySchema } from "@/lib/validation/pushes";

// The company's devices with firmware, model and where they are.
export const GET = apiHandler({ query: deviceListQuerySchema }, async ({ actor, query }) => ({ items: await listDevices({ actor, query }) }));

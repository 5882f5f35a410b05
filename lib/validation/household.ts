import { z } from "zod";

export const householdZoneParamsSchema = z.object({ zoneId: z.uuid("That is not a valid room id.") });

export const presetOrderSchema = z.object({
  /** The zone version the new order was made from; a newer one means someone else changed the room. */
  version: z.number().int().min(1),
  presetIds: z.array(z.uuid()).min(1, "There are no stations to put in order.").max(100),
});
export type PresetOrderInput = z.infer<typeof presetOrderSchema>;

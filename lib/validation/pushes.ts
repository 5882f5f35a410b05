import { z } from "zod";
import type { PushTargetState } from "@/db/schema/pushes";

// Schemas for pushes, drift and device care, shared by route handlers, the
// push service and the client components that build requests.

// Spelled out (not imported) so client components using this module do not pull in the schema.
export const pushTargetStateNames = [
  "queued",
  "sending",
  "awaiting_report",
  "applied",
  "failed",
  "superseded",
  "cancelled",
] as const satisfies readonly PushTargetState[];

const uuid = (what: string) => z.uuid(`That is not a valid ${what} id.`);

/** What a push covers. The server works out the zones again; the client only names the scope. */
export const pushScopeSchema = z.discriminatedUnion(
  "kind",
  [
    z.object({ kind: z.literal("zone"), zoneId: uuid("zone") }),
    z.object({ kind: z.literal("home"), homeId: uuid("home") }),
    z.object({
      kind: z.literal("selection"),
      zoneIds: z
        .array(uuid("zone"))
        .min(1, "Choose at least one zone.")
        .max(10_000, "At most 10,000 zones per push.")
        .refine((ids) => new Set(ids).size === ids.length, "A zone is named twice."),
    }),
    z.object({ kind: z.literal("template"), templateId: uuid("template") }),
    z.object({
      kind: z.literal("rollback"),
      zoneId: uuid("zone"),
      revisionId: uuid("revision"),
      /**
       * Also make that revision the zone's desired configuration again (needs zone:edit).
       * Without it the revision is only pushed (support's re-push of a known-good revision).
       */
      restore: z.boolean().optional(),
      /** With restore: the zone version the rollback was based on (409 when someone changed it since). */
      expectedVersion: z.number().int().min(1).optional(),
    }),
    z.object({
      kind: z.literal("household"),
      homeId: uuid("home"),
      /** Zones whose change the household made (e.g. a station reorder); all zones of the home when absent. */
      zoneIds: z.array(uuid("zone")).min(1).max(100).optional(),
    }),
  ],
  { error: "Choose what to push: a zone, a home, a selection of zones, a template or a rollback." },
);
export type PushScope = z.infer<typeof pushScopeSchema>;

export const pushPreviewBodySchema = z.object({ scope: pushScopeSchema });

export const startPushBodySchema = z.object({
  scope: pushScopeSchema,
  /**
   * zoneId → revisionId as shown in the preview. When a zone has a different
   * revision by the time the push starts, nothing is pushed (409) so people push
   * what they saw.
   */
  expectedRevisions: z.record(z.string(), uuid("revision")).optional(),
  note: z.string().trim().max(500).optional(),
});
export type StartPushBody = z.infer<typeof startPushBodySchema>;

export const pushIdParamsSchema = z.object({ pushId: uuid("push") });

export const pushListQuerySchema = z.object({
  page: z.coerce.number().int().min(1).max(10_000).optional().default(1),
  pageSize: z.coerce.number().int().min(5).max(100).optional().default(25),
});
export type PushListQuery = z.infer<typeof pushListQuerySchema>;

export const pushDetailQuerySchema = z.object({
  state: z.enum(pushTargetStateNames).optional(),
  page: z.coerce.number().int().min(1).max(10_000).optional().default(1),
  pageSize: z.coerce.number().int().min(10).max(500).optional().default(200),
});
export type PushDetailQuery = z.infer<typeof pushDetailQuerySchema>;

export function pushDetailUrl(pushId: string, q: Partial<PushDetailQuery> = {}): string {
  const params = new URLSearchParams();
  if (q.state) params.set("state", q.state);
  if (q.page && q.page > 1) params.set("page", String(q.page));
  if (q.pageSize && q.pageSize !== 200) params.set("pageSize", String(q.pageSize));
  const qs = params.toString();
  return `/api/pushes/${pushId}${qs ? `?${qs}` : ""}`;
}

export const zoneIdParamsSchema = z.object({ zoneId: uuid("zone") });

export const adoptReportedBodySchema = z.object({
  expectedVersion: z
    .number({ error: "The zone version the adoption is based on is missing." })
    .int()
    .min(1, "The zone version the adoption is based on is missing."),
});

export const deviceIdParamsSchema = z.object({ deviceId: uuid("device") });

const isoDateTime = z.iso.datetime({ offset: true, error: "Give a date and time (ISO 8601)." });

const maintenanceWindow = {
  version: z.string().trim().min(1, "Name the firmware version to install.").max(40),
  windowStart: isoDateTime,
  windowEnd: isoDateTime,
};

function checkWindow(w: { windowStart: string; windowEnd: string }, ctx: z.RefinementCtx) {
  const start = Date.parse(w.windowStart);
  const end = Date.parse(w.windowEnd);
  if (end <= start) ctx.addIssue({ code: "custom", path: ["windowEnd"], message: "The window must end after it starts." });
  if (end - start < 15 * 60_000) ctx.addIssue({ code: "custom", path: ["windowEnd"], message: "Give the device at least 15 minutes to install." });
  if (end - start > 7 * 24 * 3600_000) ctx.addIssue({ code: "custom", path: ["windowEnd"], message: "A maintenance window may last at most 7 days." });
  if (end <= Date.now()) ctx.addIssue({ code: "custom", path: ["windowEnd"], message: "The window has already ended." });
}

export const scheduleFirmwareBodySchema = z.object(maintenanceWindow).superRefine(checkWindow);
export type ScheduleFirmwareBody = z.infer<typeof scheduleFirmwareBodySchema>;

export const bulkFirmwareBodySchema = z
  .object({
    deviceIds: z
      .array(uuid("device"))
      .min(1, "Choose at least one device.")
      .max(5000)
      .refine((ids) => new Set(ids).size === ids.length, "A device is named twice."),
    /** Omit to install the newest firmware offered for each device's model. */
    version: maintenanceWindow.version.optional(),
    windowStart: maintenanceWindow.windowStart,
    windowEnd: maintenanceWindow.windowEnd,
  })
  .superRefine(checkWindow);
export type BulkFirmwareBody = z.infer<typeof bulkFirmwareBodySchema>;

export const deviceListQuerySchema = z.object({
  search: z.string().trim().max(100).optional().default(""),
  outdated: z
    .enum(["true", "false"])
    .optional()
    .transform((v) => v === "true"),
});
export type DeviceListQuery = z.infer<typeof deviceListQuerySchema>;

/** SWR keys shared by server pages (fallback) and client components. */
export function pushListUrl(page: number): string {
  return `/api/pushes?page=${page}&pageSize=25`;
}

export function deviceUrl(deviceId: string): string {
  return `/api/devices/${deviceId}`;
}

export function deviceListUrl(search: string, outdated: boolean): string {
  const params = new URLSearchParams();
  if (search) params.set("search", search);
  if (outdated) params.set("outdated", "true");
  const qs = params.toString();
  return `/api/devices${qs ? `?${qs}` : ""}`;
}

export function zoneDriftUrl(zoneId: string): string {
  return `/api/zones/${zoneId}/drift`;
}

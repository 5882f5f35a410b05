import { z } from "zod";

// Schemas for zone history (revisions, compare, restore, delete) and the
// activity trail, shared by route handlers and the pages that build their URLs.

const emptyToUndefined = (v: unknown) => (v === "" || v === null ? undefined : v);

export const zoneIdParamsSchema = z.object({ zoneId: z.uuid("That is not a valid zone id.") });
export const revisionParamsSchema = zoneIdParamsSchema.extend({ revisionId: z.uuid("That is not a valid revision id.") });

export const revisionListQuerySchema = z.object({
  page: z.coerce.number().int().min(1).max(10_000).optional().default(1),
  pageSize: z.coerce.number().int().min(5).max(100).optional().default(20),
});
export type RevisionListQuery = z.infer<typeof revisionListQuerySchema>;

/** A revision id, or "current" for the zone's current revision. */
const revisionRefSchema = z.union([z.literal("current"), z.uuid("Name a revision by its id, or “current”.")]);

export const compareQuerySchema = z.object({
  from: revisionRefSchema,
  to: revisionRefSchema,
});
export type CompareQuery = z.infer<typeof compareQuerySchema>;

export const restoreBodySchema = z.object({
  expectedVersion: z
    .number({ error: "The zone version the restore is based on is missing." })
    .int()
    .min(1, "The zone version the restore is based on is missing."),
  message: z.string().trim().max(500, "Keep the note to 500 characters.").optional(),
});
export type RestoreBody = z.infer<typeof restoreBodySchema>;

export const zoneDeleteQuerySchema = z.object({
  expectedVersion: z.coerce
    .number({ error: "The zone version the deletion is based on is missing." })
    .int()
    .min(1, "The zone version the deletion is based on is missing."),
});

// ── activity ────────────────────────────────────────────────────────────────

const dateOnly = /^\d{4}-\d{2}-\d{2}$/;
const dateSchema = z.preprocess(
  emptyToUndefined,
  z
    .string()
    .refine((v) => dateOnly.test(v) && !Number.isNaN(Date.parse(`${v}T00:00:00Z`)), "Use a date like 2025-03-31.")
    .optional(),
);

export const activityQuerySchema = z
  .object({
    person: z.preprocess(emptyToUndefined, z.string().max(100).optional()),
    home: z.preprocess(emptyToUndefined, z.uuid("That is not a valid home id.").optional()),
    zone: z.preprocess(emptyToUndefined, z.uuid("That is not a valid zone id.").optional()),
    /** A kind ("zone.restored") or a family of kinds ending in a dot ("zone."). */
    kind: z.preprocess(
      emptyToUndefined,
      z
        .string()
        .max(60)
        .regex(/^[a-z0-9._-]+$/, "Kinds are lower-case words joined by dots, e.g. zone.restored.")
        .optional(),
    ),
    /** First day, inclusive, in the viewer's time zone. */
    from: dateSchema,
    /** Last day, inclusive, in the viewer's time zone. */
    to: dateSchema,
    /** The viewer's offset from UTC in minutes, as Date#getTimezoneOffset gives it (UTC+2 → -120). */
    tz: z.coerce.number().int().min(-840).max(840).optional().default(0),
    page: z.coerce.number().int().min(1).max(100_000).optional().default(1),
    pageSize: z.coerce.number().int().min(5).max(100).optional().default(25),
  })
  .refine((q) => !q.from || !q.to || q.from <= q.to, { message: "The first day must not be after the last day.", path: ["to"] });
export type ActivityQuery = z.infer<typeof activityQuerySchema>;
export type ActivityFilters = Omit<ActivityQuery, "page" | "pageSize">;

/** Start (inclusive) and end (exclusive) instants of the chosen days in the viewer's time zone. */
export function activityRange(q: Pick<ActivityQuery, "from" | "to" | "tz">): { start: Date | null; end: Date | null } {
  const at = (day: string, addDays: number) => {
    const t = Date.parse(`${day}T00:00:00Z`) + addDays * 86_400_000 + q.tz * 60_000;
    return new Date(t);
  };
  return { start: q.from ? at(q.from, 0) : null, end: q.to ? at(q.to, 1) : null };
}

/** The query string of an activity URL (same on server and client, so SWR keys match). */
export function activitySearch(q: Partial<ActivityQuery>): string {
  const params = new URLSearchParams();
  for (const key of ["person", "home", "zone", "kind", "from", "to"] as const) {
    const v = q[key];
    if (v) params.set(key, v);
  }
  if (q.tz) params.set("tz", String(q.tz));
  if (q.page && q.page !== 1) params.set("page", String(q.page));
  if (q.pageSize && q.pageSize !== 25) params.set("pageSize", String(q.pageSize));
  return params.toString();
}

export function activityUrl(q: Partial<ActivityQuery>): string {
  const s = activitySearch(q);
  return s ? `/api/activity?${s}` : "/api/activity";
}

export function activityExportUrl(q: Partial<ActivityQuery>): string {
  const s = activitySearch({ ...q, page: undefined, pageSize: undefined });
  return s ? `/api/activity/export?${s}` : "/api/activity/export";
}

export function revisionListUrl(zoneId: string, q: Partial<RevisionListQuery> = {}): string {
  const params = new URLSearchParams();
  if (q.page && q.page !== 1) params.set("page", String(q.page));
  if (q.pageSize && q.pageSize !== 20) params.set("pageSize", String(q.pageSize));
  const s = params.toString();
  return `/api/zones/${zoneId}/revisions${s ? `?${s}` : ""}`;
}

export function compareUrl(zoneId: string, from: string, to: string): string {
  return `/api/zones/${zoneId}/revisions/compare?${new URLSearchParams({ from, to }).toString()}`;
}

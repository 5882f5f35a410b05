import { z } from "zod";
import { zoneConfigSchema } from "@/lib/validation/zone-config";

// The device-fleet HTTP API as we use it: every request and response body, once.
// The fleet is a hosted service we do not own, so the client validates every
// answer against these schemas and the local fake (mocks/fleet) serves exactly them.
//
//   GET  {base}/v1/devices?cursor=&limit=            → listDevicesResponseSchema
//   GET  {base}/v1/devices/:deviceId                 → deviceStateResponseSchema
//   PUT  {base}/v1/devices/:deviceId/desired         ← putDesiredRequestSchema (Idempotency-Key)
//                                                    → 202 putDesiredAcceptedSchema
//                                                    → 409 versionConflictBodySchema
//                                                    → 422 unsupportedBodySchema
//   GET  {base}/v1/devices/:deviceId/firmware        → firmwareResponseSchema
//   POST {base}/v1/devices/:deviceId/firmware-updates ← firmwareUpdateRequestSchema (Idempotency-Key)
//                                                    → 202 firmwareUpdateAcceptedSchema
//   GET  {base}/v1/devices/:deviceId/logs            → text/plain log bundle
//   POST <our webhook URL>                           ← fleetWebhookEventSchema, signed (webhook-signature.ts)
//
// Every request carries `Authorization: Bearer <api key>`; errors are errorBodySchema.

export const IDEMPOTENCY_KEY_HEADER = "Idempotency-Key";
export const WEBHOOK_TIMESTAMP_HEADER = "x-fleet-timestamp";
export const WEBHOOK_SIGNATURE_HEADER = "x-fleet-signature";

export const DEVICE_PAGE_DEFAULT_LIMIT = 50;
export const DEVICE_PAGE_MAX_LIMIT = 200;

// Timestamps are ISO 8601; offsets are accepted because we do not control the sender.
const timestamp = z.iso.datetime({ offset: true });
const version = z.int().min(0);

export const deviceIdSchema = z.string().min(1).max(120);

export const deviceSummarySchema = z.object({
  deviceId: deviceIdSchema,
  modelProfileId: z.string().min(1),
  serial: z.string().min(1),
  firmwareVersion: z.string().min(1),
  online: z.boolean(),
  lastSeenAt: timestamp,
});

export const listDevicesQuerySchema = z.object({
  cursor: z.string().min(1).optional(),
  limit: z.coerce.number().int().min(1).max(DEVICE_PAGE_MAX_LIMIT).optional(),
});

export const listDevicesResponseSchema = z.object({
  devices: z.array(deviceSummarySchema),
  nextCursor: z.string().min(1).nullable(),
});

export const reportStatuses = ["applied", "partial", "rejected"] as const;
export const reportStatusSchema = z.enum(reportStatuses);

export const desiredStateSchema = z.object({
  version,
  config: zoneConfigSchema.nullable(),
  updatedAt: timestamp,
});

export const reportedStateSchema = z.object({
  /** The desired version this report answers (0 before the first apply). */
  version,
  config: zoneConfigSchema.nullable(),
  reportedAt: timestamp.nullable(),
  status: reportStatusSchema.nullable(),
  error: z.string().nullable(),
});

export const deviceStateResponseSchema = z.object({
  device: deviceSummarySchema,
  desired: desiredStateSchema,
  reported: reportedStateSchema,
});

export const putDesiredRequestSchema = z.object({
  /** Compare-and-set: the desired version we last read; a mismatch is a 409. */
  expectedVersion: version,
  config: zoneConfigSchema,
  /** Free text kept with the desired state, e.g. our push target id, for support. */
  reference: z.string().min(1).max(200),
});

export const putDesiredAcceptedSchema = z.object({
  version: version.min(1),
  accepted: z.literal(true),
  /** True when this Idempotency-Key was already accepted: nothing new was stored. */
  duplicate: z.boolean(),
});

export const firmwareResponseSchema = z.object({
  current: z.string().min(1),
  available: z.string().min(1).nullable(),
});

export const firmwareUpdateRequestSchema = z
  .object({
    version: z.string().min(1),
    windowStart: timestamp,
    windowEnd: timestamp,
  })
  .refine((w) => Date.parse(w.windowEnd) > Date.parse(w.windowStart), {
    message: "windowEnd must be after windowStart",
    path: ["windowEnd"],
  });

export const firmwareUpdateAcceptedSchema = z.object({
  updateId: z.string().min(1),
});

// Error bodies. `error` is a stable machine code; `message` is for humans and logs.
export const errorBodySchema = z.object({
  error: z.string(),
  message: z.string().optional(),
});

export const versionConflictBodySchema = z.object({
  error: z.literal("version_conflict"),
  currentVersion: version,
});

export const unsupportedBodySchema = z.object({
  error: z.literal("unsupported"),
  reasons: z.array(z.string()).min(1),
});

// ---------------------------------------------------------------------------
// Webhook: fleet → our app, POST <webhookUrl>, signed with x-fleet-timestamp and
// x-fleet-signature: v1=<hex HMAC-SHA256(secret, `${timestamp}.${rawBody}`)>.
//
// Every event carries the same fields so a receiver can store it as one row:
// - eventId: unique per event; a redelivery (retry or duplicate) repeats it → dedupe on it.
// - sequence: increases by one for every state change of the device (apply, local
//   change, firmware, online). Deliveries may arrive late and out of order: an event
//   whose sequence is not above the last one stored for the device is stale.
// - desiredVersion: the device's desired version when the event happened.
// - reportedVersion: the desired version the reported config answers.
// - status/config/error: the reported state after the event (null before any apply).
// - origin: 'apply' when the device applied a desired version, 'local' when it changed
//   on its own (buttons, its local setup page): drift without any push. 'system' for
//   firmware and connectivity events.
// - firmwareVersion/online: the device's firmware and connectivity after the event.
// - updateId: the firmware update this event concludes (kind 'firmware' only).

export const webhookEventKinds = ["reported", "firmware", "online"] as const;
export const webhookOrigins = ["apply", "local", "system"] as const;

const webhookEventBase = z.object({
  eventId: z.string().min(1),
  deviceId: deviceIdSchema,
  sequence: z.int().min(1),
  desiredVersion: version,
  reportedVersion: version,
  status: reportStatusSchema.nullable(),
  config: zoneConfigSchema.nullable(),
  error: z.string().nullable(),
  firmwareVersion: z.string().min(1),
  online: z.boolean(),
  origin: z.enum(webhookOrigins),
  updateId: z.string().min(1).nullable(),
  occurredAt: timestamp,
});

export const reportedEventSchema = webhookEventBase.extend({
  kind: z.literal("reported"),
  status: reportStatusSchema,
  origin: z.enum(["apply", "local"]),
  updateId: z.null(),
});

export const firmwareEventSchema = webhookEventBase.extend({
  kind: z.literal("firmware"),
  /** applied: now running the new firmware; rejected: the window was missed or the install failed. */
  status: z.enum(["applied", "rejected"]),
  origin: z.literal("system"),
  updateId: z.string().min(1),
});

export const onlineEventSchema = webhookEventBase.extend({
  kind: z.literal("online"),
  origin: z.literal("system"),
  updateId: z.null(),
});

export const fleetWebhookEventSchema = z.discriminatedUnion("kind", [
  reportedEventSchema,
  firmwareEventSchema,
  onlineEventSchema,
]);

export type DeviceSummary = z.infer<typeof deviceSummarySchema>;
export type ListDevicesQuery = z.infer<typeof listDevicesQuerySchema>;
export type ListDevicesResponse = z.infer<typeof listDevicesResponseSchema>;
export type ReportStatus = z.infer<typeof reportStatusSchema>;
export type DesiredState = z.infer<typeof desiredStateSchema>;
export type ReportedState = z.infer<typeof reportedStateSchema>;
export type DeviceStateResponse = z.infer<typeof deviceStateResponseSchema>;
export type PutDesiredRequest = z.infer<typeof putDesiredRequestSchema>;
export type PutDesiredAccepted = z.infer<typeof putDesiredAcceptedSchema>;
export type FirmwareResponse = z.infer<typeof firmwareResponseSchema>;
export type FirmwareUpdateRequest = z.infer<typeof firmwareUpdateRequestSchema>;
export type FirmwareUpdateAccepted = z.infer<typeof firmwareUpdateAcceptedSchema>;
export type ErrorBody = z.infer<typeof errorBodySchema>;
export type VersionConflictBody = z.infer<typeof versionConflictBodySchema>;
export type UnsupportedBody = z.infer<typeof unsupportedBodySchema>;
export type WebhookEventKind = (typeof webhookEventKinds)[number];
export type ReportedEvent = z.infer<typeof reportedEventSchema>;
export type FirmwareEvent = z.infer<typeof firmwareEventSchema>;
export type OnlineEvent = z.infer<typeof onlineEventSchema>;
export type FleetWebhookEvent = z.infer<typeof fleetWebhookEventSchema>;

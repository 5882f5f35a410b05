import "server-only";
import { and, eq, inArray, sql } from "drizzle-orm";
import { devices, firmwareUpdates, modelProfiles } from "@/db/schema";
import { recordAudit } from "@/db/queries/audit";
import { compareFirmware } from "@/db/queries/devices";
import { db } from "@/db/client";
import { AppError } from "@/lib/errors";
import { FleetError, type FleetClient } from "@/lib/fleet/client";
import { QUEUES, withJobs } from "@/lib/fleet/queue";
import { type Actor, can } from "@/lib/permissions";

// Firmware updates for one device or many: a durable job per device, moving
// through the same states as a push target (queued → sending → awaiting the
// device → applied | failed), inside a maintenance window the household sees.

export interface FirmwareOffer {
  current: string;
  available: string | null;
  /** "fleet" when the fleet answered; "model" when it did not and we fell back to the model profile. */
  source: "fleet" | "model";
  note: string | null;
}

/** What the fleet offers this device, or the model profile's newest when the fleet does not answer. */
export async function firmwareOffer(fleet: FleetClient, device: { fleetDeviceId: string; firmwareVersion: string; latestFirmware: string }): Promise<FirmwareOffer> {
  try {
    const answer = await fleet.getFirmware(device.fleetDeviceId);
    return { current: answer.current, available: answer.available, source: "fleet", note: null };
  } catch (error) {
    const available = compareFirmware(device.latestFirmware, device.firmwareVersion) > 0 ? device.latestFirmware : null;
    return {
      current: device.firmwareVersion,
      available,
      source: "model",
      note: `The fleet did not answer (${error instanceof FleetError ? error.code : "error"}); showing the newest firmware we know for this model.`,
    };
  }
}

export interface ScheduleFirmwareInput {
  actor: Actor;
  fleet: FleetClient;
  deviceIds: string[];
  /** A version to install on every device; by default the newest each device is offered. */
  version?: string;
  windowStart: string;
  windowEnd: string;
}

export interface ScheduleFirmwareResult {
  scheduled: { deviceId: string; serial: string; version: string; updateId: string }[];
  refused: { deviceId: string; serial: string; reason: string }[];
}

async function mapLimit<T, R>(items: T[], limit: number, fn: (item: T) => Promise<R>): Promise<R[]> {
  const out: R[] = new Array(items.length);
  let next = 0;
  await Promise.all(
    Array.from({ length: Math.min(limit, items.length) }, async () => {
      while (next < items.length) {
        const i = next++;
        out[i] = await fn(items[i]);
      }
    }),
  );
  return out;
}

export async function scheduleFirmware({ actor, fleet, deviceIds, version, windowStart, windowEnd }: ScheduleFirmwareInput): Promise<ScheduleFirmwareResult> {
  const rows = await db
    .select({
      id: devices.id,
      organizationId: devices.organizationId,
      homeId: devices.homeId,
      serial: devices.serial,
      fleetDeviceId: devices.fleetDeviceId,
      firmwareVersion: devices.firmwareVersion,
      latestFirmware: modelProfiles.latestFirmware,
      busy: sql<boolean>`exists (select 1 from firmware_updates f where f.device_id = "devices"."id" and f.state in ('queued','sending','awaiting_report'))`,
    })
    .from(devices)
    .innerJoin(modelProfiles, eq(modelProfiles.id, devices.modelProfileId))
    .where(and(inArray(devices.id, deviceIds), eq(devices.organizationId, actor.organizationId)));
  if (rows.length !== deviceIds.length) throw new AppError("device:not-found", { message: `${deviceIds.length - rows.length} of the chosen devices do not exist.` });
  const forbidden = rows.filter((d) => !can(actor, "device:care", d.homeId ? { id: d.homeId, organizationId: d.organizationId } : null));
  if (forbidden.length) throw new AppError("auth:forbidden", { message: "Only support, an integrator or the owner may schedule firmware updates." });

  // Ask the fleet what each device is offered before writing anything (a person is waiting: a few at a time).
  const offers = await mapLimit(rows, 8, async (d) => {
    try {
      return { ok: true as const, offer: await fleet.getFirmware(d.fleetDeviceId) };
    } catch (error) {
      return { ok: false as const, error };
    }
  });
  if (offers.every((o) => !o.ok)) throw new AppError("fleet:unavailable");

  const refused: ScheduleFirmwareResult["refused"] = [];
  const planned: { device: (typeof rows)[number]; version: string }[] = [];
  rows.forEach((d, i) => {
    const answer = offers[i];
    if (d.busy) return refused.push({ deviceId: d.id, serial: d.serial, reason: "A firmware update is already scheduled for this device." });
    if (!answer.ok) return refused.push({ deviceId: d.id, serial: d.serial, reason: "The fleet did not answer for this device; try again." });
    const available = answer.offer.available;
    if (!available) return refused.push({ deviceId: d.id, serial: d.serial, reason: `Already on the newest firmware (${answer.offer.current}).` });
    if (version && version !== available) {
      return refused.push({ deviceId: d.id, serial: d.serial, reason: `The fleet offers ${available} for this device, not ${version}.` });
    }
    planned.push({ device: d, version: available });
  });
  if (planned.length === 0) {
    throw new AppError("device:no-firmware", {
      message: refused.length === 1 ? refused[0].reason : `No device can be updated: ${refused.map((r) => `${r.serial}: ${r.reason}`).slice(0, 3).join(" ")}`,
      details: { refused },
    });
  }

  return withJobs(async (tx, jobs) => {
    const inserted = await tx
      .insert(firmwareUpdates)
      .values(
        planned.map((p) => ({
          organizationId: actor.organizationId,
          deviceId: p.device.id,
          targetVersion: p.version,
          windowStart: new Date(windowStart),
          windowEnd: new Date(windowEnd),
          createdBy: actor.userId,
        })),
      )
      .returning({ id: firmwareUpdates.id, deviceId: firmwareUpdates.deviceId, targetVersion: firmwareUpdates.targetVersion });
    for (const row of inserted) jobs.push({ queue: QUEUES.firmware, data: { updateId: row.id } });
    const homeIds = [...new Set(planned.map((p) => p.device.homeId))];
    await recordAudit(tx, actor, {
      kind: "device.firmware-scheduled",
      summary:
        planned.length === 1
          ? `Scheduled firmware ${planned[0].version} for device ${planned[0].device.serial}`
          : `Scheduled firmware updates for ${planned.length} devices`,
      homeId: homeIds.length === 1 ? homeIds[0] : null,
      changes: [
        ...planned.slice(0, 50).map((p) => ({ field: `firmware of ${p.device.serial}`, before: p.device.firmwareVersion, after: p.version })),
        { field: "maintenance window", before: null, after: `${windowStart} – ${windowEnd}` },
      ],
    });
    const bySerial = new Map(planned.map((p) => [p.device.id, p.device.serial] as const));
    return {
      scheduled: inserted.map((r) => ({ deviceId: r.deviceId, serial: bySerial.get(r.deviceId)!, version: r.targetVersion, updateId: r.id })),
      refused,
    };
  });
}

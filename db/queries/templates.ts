import "server-only";
import { and, asc, eq, inArray, isNotNull, isNull, or, sql } from "drizzle-orm";
import { db, type Transaction } from "@/db/client";
import {
  devices,
  homeAssignments,
  homes,
  modelProfiles,
  sources,
  streamPresets,
  toneCurveBands,
  toneCurves,
  user,
  zones,
  zoneTemplates,
} from "@/db/schema";
import { applyZoneConfig, CurveResolver } from "@/db/queries/apply-config";
import { recordAudit } from "@/db/queries/audit";
import { changeZone, loadCurvesForConfig, loadZoneConfig, loadZoneForActor, snapshotZone } from "@/db/queries/zone-writes";
import { AppError } from "@/lib/errors";
import { type Actor, type HomeRef, can } from "@/lib/permissions";
import type { ApplyTemplateInput, BulkUpdateInput, CreateTemplateInput, UpdateTemplateInput } from "@/lib/validation/templates";
import type { ConfigBand, ZoneConfig } from "@/lib/validation/zone-config";
import { diffZoneConfigs, toAuditChanges, type ConfigChange } from "@/lib/zones/config-diff";
import { buildZoneConfig } from "@/lib/zones/build-config";
import { deviceFitProblems } from "@/lib/zones/config-fits-device";
import { contentHash } from "@/lib/zones/content-hash";
import { keptText, mergeTemplateIntoZone, templateConfigFromZone, type KeptReason } from "@/lib/zones/template-merge";

// The zone template library: save a zone as a template, rename, describe, edit,
// duplicate, delete when unused; make a zone from a template in a home (bound to
// a free device); and bring zones made from a template up to its newer version,
// field by field, keeping what each zone sets itself.

type Executor = Transaction | typeof db;

export interface TemplateSummaryDto {
  id: string;
  name: string;
  description: string;
  version: number;
  zoneCount: number;
  behindCount: number;
  sourceLabels: string[];
  presetCount: number;
  volumeCeiling: number;
  createdBy: string | null;
  updatedAt: string;
}

export interface TemplateZoneDto {
  zoneId: string;
  zoneName: string;
  home: { id: string; name: string };
  templateVersion: number | null;
  version: number;
  overrides: string[];
  behind: boolean;
  canApply: boolean;
}

export interface TemplateDetailDto extends TemplateSummaryDto {
  config: ZoneConfig;
  zones: TemplateZoneDto[];
}

const liveZones = sql`z.template_id = "zone_templates"."id" and z.deleted_at is null`;

function requireLibrary(actor: Actor) {
  if (!can(actor, "library:read")) throw new AppError("auth:forbidden");
}

export async function listTemplates({ actor }: { actor: Actor }): Promise<TemplateSummaryDto[]> {
  requireLibrary(actor);
  const rows = await db
    .select({
      id: zoneTemplates.id,
      name: zoneTemplates.name,
      description: zoneTemplates.description,
      version: zoneTemplates.version,
      config: zoneTemplates.config,
      updatedAt: zoneTemplates.updatedAt,
      createdBy: user.name,
      zoneCount: sql<number>`(select count(*)::int from zones z where ${liveZones})`,
      behindCount: sql<number>`(select count(*)::int from zones z where ${liveZones} and coalesce(z.template_version, 0) < "zone_templates"."version")`,
    })
    .from(zoneTemplates)
    .leftJoin(user, eq(user.id, zoneTemplates.createdBy))
    .where(eq(zoneTemplates.organizationId, actor.organizationId))
    .orderBy(asc(zoneTemplates.name), asc(zoneTemplates.id));
  return rows.map(toSummary);
}

function toSummary(r: {
  id: string;
  name: string;
  description: string;
  version: number;
  config: ZoneConfig;
  updatedAt: Date;
  createdBy: string | null;
  zoneCount: number;
  behindCount: number;
}): TemplateSummaryDto {
  return {
    id: r.id,
    name: r.name,
    description: r.description,
    version: r.version,
    zoneCount: r.zoneCount,
    behindCount: r.behindCount,
    sourceLabels: r.config.sources.map((s) => s.label),
    presetCount: r.config.presets.length,
    volumeCeiling: r.config.volumeCeiling,
    createdBy: r.createdBy,
    updatedAt: r.updatedAt.toISOString(),
  };
}

async function loadTemplateRow(tx: Executor, actor: Actor, templateId: string, forUpdate = false) {
  const q = tx
    .select()
    .from(zoneTemplates)
    .where(and(eq(zoneTemplates.id, templateId), eq(zoneTemplates.organizationId, actor.organizationId)));
  const [row] = forUpdate ? await q.for("update") : await q;
  if (!row) throw new AppError("template:not-found");
  return row;
}

export async function getTemplate({ actor, templateId }: { actor: Actor; templateId: string }): Promise<TemplateDetailDto> {
  requireLibrary(actor);
  const [row] = await db
    .select({
      id: zoneTemplates.id,
      name: zoneTemplates.name,
      description: zoneTemplates.description,
      version: zoneTemplates.version,
      config: zoneTemplates.config,
      updatedAt: zoneTemplates.updatedAt,
      createdBy: user.name,
      zoneCount: sql<number>`(select count(*)::int from zones z where ${liveZones})`,
      behindCount: sql<number>`(select count(*)::int from zones z where ${liveZones} and coalesce(z.template_version, 0) < "zone_templates"."version")`,
    })
    .from(zoneTemplates)
    .leftJoin(user, eq(user.id, zoneTemplates.createdBy))
    .where(and(eq(zoneTemplates.id, templateId), eq(zoneTemplates.organizationId, actor.organizationId)));
  if (!row) throw new AppError("template:not-found");
  const zoneRows = await db
    .select({
      zoneId: zones.id,
      zoneName: zones.name,
      homeId: homes.id,
      homeName: homes.name,
      organizationId: zones.organizationId,
      templateVersion: zones.templateVersion,
      version: zones.version,
      overrides: zones.overrides,
    })
    .from(zones)
    .innerJoin(homes, eq(homes.id, zones.homeId))
    .where(and(eq(zones.templateId, templateId), eq(zones.organizationId, actor.organizationId), isNull(zones.deletedAt)))
    .orderBy(asc(homes.name), asc(zones.position));
  return {
    ...toSummary(row),
    config: row.config,
    zones: zoneRows.map((z) => ({
      zoneId: z.zoneId,
      zoneName: z.zoneName,
      home: { id: z.homeId, name: z.homeName },
      templateVersion: z.templateVersion,
      version: z.version,
      overrides: z.overrides,
      behind: (z.templateVersion ?? 0) < row.version,
      canApply: can(actor, "template:apply", { id: z.homeId, organizationId: z.organizationId }),
    })),
  };
}

export interface CurveChoiceDto {
  id: string;
  name: string;
  bands: ConfigBand[];
}

/** The company's tone curves, with bands, for the template editor's curve choices. */
export async function listCurveChoices({ actor, tx = db }: { actor: Actor; tx?: Executor }): Promise<CurveChoiceDto[]> {
  requireLibrary(actor);
  const curveRows = await tx
    .select({ id: toneCurves.id, name: toneCurves.name })
    .from(toneCurves)
    .where(eq(toneCurves.organizationId, actor.organizationId))
    .orderBy(asc(toneCurves.name));
  const ids = curveRows.map((c) => c.id);
  const bandRows = ids.length
    ? await tx.select().from(toneCurveBands).where(inArray(toneCurveBands.curveId, ids)).orderBy(asc(toneCurveBands.position))
    : [];
  return curveRows.map((c) => ({
    id: c.id,
    name: c.name,
    bands: bandRows
      .filter((b) => b.curveId === c.id)
      .map((b) => ({ type: b.type, frequencyHz: b.frequencyHz, gainDb: b.gainDb, q: b.q, enabled: b.enabled })),
  }));
}

/**
 * Curves an editor names by id are taken from the library as they are now, so a
 * template cannot carry made-up bands under a library curve's name.
 */
async function resolveEditorCurves(tx: Executor, actor: Actor, config: ZoneConfig): Promise<ZoneConfig> {
  const library = new Map((await listCurveChoices({ actor, tx })).map((c) => [c.id, c]));
  const missing: Record<string, string[]> = {};
  const resolve = (ref: ZoneConfig["zoneCurve"], path: string): ZoneConfig["zoneCurve"] => {
    if (!ref) return null;
    if (ref.id === null) return ref;
    const curve = library.get(ref.id);
    if (!curve) {
      missing[path] = ["That tone curve is not in your library."];
      return ref;
    }
    return { id: curve.id, name: curve.name, bands: curve.bands.map((b) => ({ ...b })) };
  };
  const out: ZoneConfig = {
    ...config,
    zoneCurve: resolve(config.zoneCurve, "config.zoneCurve"),
    sources: config.sources.map((s, i) => ({ ...s, toneCurve: resolve(s.toneCurve, `config.sources.${i}.toneCurve`) })),
    presets: config.presets.map((p, i) => ({ ...p, toneCurve: resolve(p.toneCurve, `config.presets.${i}.toneCurve`) })),
    guestControls: { ...config.guestControls, locked: false },
  };
  if (Object.keys(missing).length) throw new AppError("request:invalid", { fieldErrors: missing });
  return out;
}

export async function createTemplateFromZone({ actor, input }: { actor: Actor; input: CreateTemplateInput }): Promise<TemplateSummaryDto> {
  const zone = await loadZoneForActor({ actor, zoneId: input.zoneId });
  if (!can(actor, "template:edit")) throw new AppError("auth:forbidden", { message: "Your role may not make zone templates." });
  return db.transaction(async (tx) => {
    const config = templateConfigFromZone(await loadZoneConfig(tx, zone.id), input.name);
    const [row] = await tx
      .insert(zoneTemplates)
      .values({ organizationId: actor.organizationId, name: input.name, description: input.description, config, createdBy: actor.userId })
      .returning();
    await recordAudit(tx, actor, {
      kind: "template.created",
      summary: `Saved zone “${zone.name}” as template “${input.name}”`,
      homeId: zone.homeId,
      zoneId: zone.id,
      changes: [
        { field: "name", before: null, after: input.name },
        { field: "from zone", before: null, after: zone.name },
      ],
    });
    return toSummary({ ...row, createdBy: actor.name, zoneCount: 0, behindCount: 0 });
  });
}

export async function updateTemplate({
  actor,
  templateId,
  input,
}: {
  actor: Actor;
  templateId: string;
  input: UpdateTemplateInput;
}): Promise<TemplateDetailDto> {
  requireLibrary(actor);
  await loadTemplateRow(db, actor, templateId);
  if (!can(actor, "template:edit")) throw new AppError("auth:forbidden", { message: "Your role may not edit zone templates." });
  await db.transaction(async (tx) => {
    const row = await loadTemplateRow(tx, actor, templateId, true);
    if (row.version !== input.version) throw new AppError("template:stale", { details: { currentVersion: row.version } });
    const name = input.name ?? row.name;
    const description = input.description ?? row.description;
    let config = row.config;
    let configChanged = false;
    if (input.config) {
      // Keys follow the template convention (sources by slot, stations by position).
      const next = templateConfigFromZone(await resolveEditorCurves(tx, actor, { ...input.config, schema: 1, name }), name);
      configChanged = contentHash({ ...next, name: "" }) !== contentHash({ ...row.config, name: "" });
      config = next;
    }
    config = { ...config, name };
    const changes = [
      ...(name !== row.name ? [{ field: "name", before: row.name, after: name }] : []),
      ...(description !== row.description ? [{ field: "description", before: row.description, after: description }] : []),
      ...(configChanged ? toAuditChanges(diffZoneConfigs(row.config, config, { ignore: ["name"] })) : []),
    ];
    if (changes.length === 0) return;
    await tx
      .update(zoneTemplates)
      .set({
        name,
        description,
        config,
        // The version counts configuration changes: zones fall behind only when what they would receive changes.
        version: configChanged ? row.version + 1 : row.version,
        updatedAt: new Date(),
      })
      .where(eq(zoneTemplates.id, templateId));
    await recordAudit(tx, actor, {
      kind: configChanged ? "template.edited" : "template.renamed",
      summary: configChanged
        ? `Edited template “${name}” (now version ${row.version + 1})`
        : `Updated the name or description of template “${name}”`,
      changes,
    });
  });
  return getTemplate({ actor, templateId });
}

export async function duplicateTemplate({
  actor,
  templateId,
  input,
}: {
  actor: Actor;
  templateId: string;
  input: { name: string; description?: string };
}): Promise<TemplateSummaryDto> {
  requireLibrary(actor);
  const source = await loadTemplateRow(db, actor, templateId);
  if (!can(actor, "template:duplicate")) throw new AppError("auth:forbidden", { message: "Your role may not duplicate zone templates." });
  return db.transaction(async (tx) => {
    const description = input.description ?? source.description;
    const [row] = await tx
      .insert(zoneTemplates)
      .values({
        organizationId: actor.organizationId,
        name: input.name,
        description,
        config: { ...structuredClone(source.config), name: input.name },
        createdBy: actor.userId,
      })
      .returning();
    await recordAudit(tx, actor, {
      kind: "template.duplicated",
      summary: `Duplicated template “${source.name}” as “${input.name}”`,
      changes: [
        { field: "name", before: null, after: input.name },
        { field: "from template", before: null, after: `${source.name} (version ${source.version})` },
      ],
    });
    return toSummary({ ...row, createdBy: actor.name, zoneCount: 0, behindCount: 0 });
  });
}

export async function deleteTemplate({ actor, templateId }: { actor: Actor; templateId: string }) {
  requireLibrary(actor);
  await loadTemplateRow(db, actor, templateId);
  if (!can(actor, "template:edit")) throw new AppError("auth:forbidden", { message: "Your role may not delete zone templates." });
  return db.transaction(async (tx) => {
    const row = await loadTemplateRow(tx, actor, templateId, true);
    // Lock the zones that use it, so none is made from it while it goes.
    const using = await tx
      .select({ id: zones.id })
      .from(zones)
      .where(and(eq(zones.templateId, templateId), isNull(zones.deletedAt)))
      .for("update");
    if (using.length > 0) {
      throw new AppError("template:in-use", {
        message: `${using.length} zone${using.length === 1 ? " still uses" : "s still use"} “${row.name}”. It can be deleted once no zone uses it.`,
        details: { zoneCount: using.length },
      });
    }
    await tx.delete(zoneTemplates).where(eq(zoneTemplates.id, templateId));
    await recordAudit(tx, actor, {
      kind: "template.deleted",
      summary: `Deleted template “${row.name}”`,
      changes: [{ field: "name", before: row.name, after: null }],
    });
    return { ok: true };
  });
}

// ── Making a zone from a template ───────────────────────────────────────────

export interface TargetDeviceDto {
  id: string;
  serial: string;
  modelName: string;
  online: boolean;
  /** The home it is installed in, or null when it is on the shelf. */
  homeId: string | null;
  problems: string[];
}

export interface TemplateTargetsDto {
  homes: { id: string; name: string; householdName: string }[];
  canCreateHome: boolean;
  devices: TargetDeviceDto[];
}

/** Homes the actor may make a zone in, and the company's free devices with whether each fits. */
export async function listTemplateTargets({
  actor,
  templateId,
  homeId,
}: {
  actor: Actor;
  templateId: string;
  homeId?: string;
}): Promise<TemplateTargetsDto> {
  requireLibrary(actor);
  const template = await loadTemplateRow(db, actor, templateId);
  const homeRows = await db
    .select({ id: homes.id, name: homes.name, householdName: homes.householdName, organizationId: homes.organizationId })
    .from(homes)
    .where(eq(homes.organizationId, actor.organizationId))
    .orderBy(asc(homes.name));
  const allowedHomes = homeRows.filter((h) => can(actor, "template:apply", h));
  const canCreateHome = can(actor, "home:create");
  if (allowedHomes.length === 0 && !canCreateHome) throw new AppError("auth:forbidden");
  const forHome = homeId && allowedHomes.some((h) => h.id === homeId) ? homeId : null;
  const deviceRows = await db
    .select({
      id: devices.id,
      serial: devices.serial,
      online: devices.online,
      homeId: devices.homeId,
      profile: {
        name: modelProfiles.name,
        presetSlots: modelProfiles.presetSlots,
        eqBands: modelProfiles.eqBands,
        inputs: modelProfiles.inputs,
        subwooferOutputs: modelProfiles.subwooferOutputs,
        hasLineOut: modelProfiles.hasLineOut,
      },
    })
    .from(devices)
    .innerJoin(modelProfiles, eq(modelProfiles.id, devices.modelProfileId))
    .where(
      and(
        eq(devices.organizationId, actor.organizationId),
        forHome ? or(isNull(devices.homeId), eq(devices.homeId, forHome)) : isNull(devices.homeId),
        sql`not exists (select 1 from zones z where z.device_id = "devices"."id" and z.deleted_at is null)`,
      ),
    )
    .orderBy(asc(devices.serial));
  return {
    homes: allowedHomes.map(({ id, name, householdName }) => ({ id, name, householdName })),
    canCreateHome,
    devices: deviceRows.map((d) => ({
      id: d.id,
      serial: d.serial,
      modelName: d.profile.name,
      online: d.online,
      homeId: d.homeId,
      problems: deviceFitProblems(template.config, d.profile),
    })),
  };
}

export interface AppliedTemplateDto {
  zoneId: string;
  zoneName: string;
  home: { id: string; name: string; created: boolean };
  revision: { id: string; number: number };
}

/**
 * A new zone from a template, in an existing home or in a new one, bound to a
 * free device of the company — one transaction: home (if new), zone, sources,
 * presets, curves, revision 1, audit.
 */
export async function applyTemplateToHome({
  actor,
  templateId,
  input,
}: {
  actor: Actor;
  templateId: string;
  input: ApplyTemplateInput;
}): Promise<AppliedTemplateDto> {
  requireLibrary(actor);
  await loadTemplateRow(db, actor, templateId);
  return db.transaction(async (tx) => {
    const template = await loadTemplateRow(tx, actor, templateId, true);
    let acting = actor;
    let home: HomeRef & { name: string };
    let createdHome = false;
    if (input.newHome) {
      if (!can(actor, "home:create")) throw new AppError("auth:forbidden", { message: "Your role may not create homes." });
      const [row] = await tx
        .insert(homes)
        .values({ organizationId: actor.organizationId, ...input.newHome })
        .returning({ id: homes.id, organizationId: homes.organizationId, name: homes.name });
      // As with POST /api/homes: an installer who creates a home works on it.
      if (actor.role === "installer") {
        await tx.insert(homeAssignments).values({ homeId: row.id, userId: actor.userId });
        acting = { ...actor, assignedHomeIds: [...actor.assignedHomeIds, row.id] };
      }
      await recordAudit(tx, actor, {
        kind: "home.created",
        summary: `Created home “${row.name}”`,
        homeId: row.id,
        changes: Object.entries(input.newHome).map(([field, after]) => ({ field, before: null, after })),
      });
      home = row;
      createdHome = true;
    } else {
      const [row] = await tx
        .select({ id: homes.id, organizationId: homes.organizationId, name: homes.name })
        .from(homes)
        .where(and(eq(homes.id, input.homeId!), eq(homes.organizationId, actor.organizationId)));
      if (!row) throw new AppError("home:not-found");
      home = row;
    }
    if (!can(acting, "template:apply", home)) {
      throw new AppError("auth:forbidden", { message: "You may make zones only in homes you are assigned to." });
    }

    const [device] = await tx
      .select({
        id: devices.id,
        homeId: devices.homeId,
        serial: devices.serial,
        profile: {
          name: modelProfiles.name,
          presetSlots: modelProfiles.presetSlots,
          eqBands: modelProfiles.eqBands,
          inputs: modelProfiles.inputs,
          subwooferOutputs: modelProfiles.subwooferOutputs,
          hasLineOut: modelProfiles.hasLineOut,
        },
      })
      .from(devices)
      .innerJoin(modelProfiles, eq(modelProfiles.id, devices.modelProfileId))
      .where(and(eq(devices.id, input.deviceId), eq(devices.organizationId, actor.organizationId)))
      .for("update", { of: devices });
    if (!device) throw new AppError("device:not-found", { fieldErrors: { deviceId: ["That device does not exist."] } });
    if (device.homeId && device.homeId !== home.id) {
      throw new AppError("device:taken", {
        message: `Device ${device.serial} is installed in another home.`,
        fieldErrors: { deviceId: ["Installed in another home."] },
      });
    }
    const [bound] = await tx
      .select({ name: zones.name })
      .from(zones)
      .where(and(eq(zones.deviceId, device.id), isNull(zones.deletedAt)));
    if (bound) {
      throw new AppError("device:taken", {
        message: `Device ${device.serial} already drives the zone “${bound.name}”.`,
        fieldErrors: { deviceId: ["Already drives a zone."] },
      });
    }
    const config: ZoneConfig = { ...structuredClone(template.config), name: input.zoneName, guestControls: { ...template.config.guestControls, locked: false } };
    const problems = deviceFitProblems(config, device.profile);
    if (problems.length) {
      throw new AppError("device:unsuitable", {
        message: `Device ${device.serial} (${device.profile.name}) cannot take “${template.name}”: ${problems.join(" ")}`,
        fieldErrors: { deviceId: problems },
        details: { problems },
      });
    }

    // A deleted zone keeps its history, not its device.
    await tx
      .update(zones)
      .set({ deviceId: null })
      .where(and(eq(zones.deviceId, device.id), isNotNull(zones.deletedAt)));
    await tx.update(devices).set({ homeId: home.id, updatedAt: new Date() }).where(eq(devices.id, device.id));
    const [{ next }] = await tx
      .select({ next: sql<number>`coalesce(max(${zones.position}) + 1, 0)::int` })
      .from(zones)
      .where(and(eq(zones.homeId, home.id), isNull(zones.deletedAt)));
    const [zone] = await tx
      .insert(zones)
      .values({
        organizationId: actor.organizationId,
        homeId: home.id,
        deviceId: device.id,
        name: input.zoneName,
        position: next,
        volumeCeiling: config.volumeCeiling,
        turnOnVolume: config.turnOnVolume,
        guestVolume: config.guestControls.volume,
        guestSource: config.guestControls.source,
        guestWake: config.guestControls.wake,
        guestLocked: false,
        deviceSettings: config.deviceSettings,
        outputLayout: config.outputLayout,
        templateId: template.id,
        templateVersion: template.version,
        overrides: [],
      })
      .returning();
    const curves = new CurveResolver(tx, acting, { createdDescription: `Bands as saved in zone template “${template.name}”.` });
    await applyZoneConfig(tx, { actor: acting, zone, config, curves });
    const revision = await snapshotZone(tx, {
      zoneId: zone.id,
      organizationId: actor.organizationId,
      authorId: actor.userId,
      message: `Made from zone template “${template.name}” (version ${template.version})`,
    });
    await recordAudit(tx, actor, {
      kind: "zone.created-from-template",
      summary: `Made zone “${input.zoneName}” in ${home.name} from template “${template.name}” (version ${template.version}) on device ${device.serial}`,
      homeId: home.id,
      zoneId: zone.id,
      changes: [
        { field: "zone", before: null, after: input.zoneName },
        { field: "template", before: null, after: `${template.name} v${template.version}` },
        { field: "device", before: null, after: device.serial },
      ],
    });
    return {
      zoneId: zone.id,
      zoneName: input.zoneName,
      home: { id: home.id, name: home.name, created: createdHome },
      revision: { id: revision.id, number: revision.number },
    };
  });
}

// ── Bringing zones up to a newer template version ───────────────────────────

export interface TemplateUpdatePreviewZone {
  zoneId: string;
  zoneName: string;
  home: { id: string; name: string };
  version: number;
  templateVersion: number | null;
  behind: boolean;
  canApply: boolean;
  changes: Pick<ConfigChange, "op" | "path" | "subject" | "field" | "beforeText" | "afterText" | "text">[];
  kept: { path: string; label: string; reason: KeptReason; text: string }[];
  problems: string[];
}

export interface TemplateUpdatePreview {
  template: { id: string; name: string; version: number };
  zones: TemplateUpdatePreviewZone[];
}

async function mergeForZone(tx: Executor, template: { config: ZoneConfig }, zone: { id: string; overrides: string[]; guestLocked: boolean }) {
  const current = await loadZoneConfig(tx, zone.id);
  const merged = mergeTemplateIntoZone({ template: template.config, zone: current, overrides: zone.overrides, guestLocked: zone.guestLocked });
  const diff = diffZoneConfigs(current, merged.config, { ignore: ["name", "guestControls.locked"] });
  return { current, merged, diff };
}

function groupBy<T>(rows: T[], key: (row: T) => string): Map<string, T[]> {
  const out = new Map<string, T[]>();
  for (const row of rows) {
    const k = key(row);
    const list = out.get(k);
    if (list) list.push(row);
    else out.set(k, [row]);
  }
  return out;
}

/**
 * Many zones' configurations in four queries (zones, sources, presets, curves),
 * instead of four per zone: a template can be behind in hundreds of zones.
 */
async function loadZoneConfigs(tx: Executor, zoneIds: string[]): Promise<Map<string, ZoneConfig>> {
  const out = new Map<string, ZoneConfig>();
  for (let i = 0; i < zoneIds.length; i += 1000) {
    const ids = zoneIds.slice(i, i + 1000);
    const [zoneRows, sourceRows, presetRows] = await Promise.all([
      tx.select().from(zones).where(inArray(zones.id, ids)),
      tx.select().from(sources).where(inArray(sources.zoneId, ids)),
      tx.select().from(streamPresets).where(inArray(streamPresets.zoneId, ids)),
    ]);
    const curves = await loadCurvesForConfig(tx, [
      ...zoneRows.flatMap((z) => (z.toneCurveId ? [z.toneCurveId] : [])),
      ...sourceRows.flatMap((r) => (r.toneCurveId ? [r.toneCurveId] : [])),
      ...presetRows.flatMap((r) => (r.toneCurveId ? [r.toneCurveId] : [])),
    ]);
    const sourcesBy = groupBy(sourceRows, (r) => r.zoneId);
    const presetsBy = groupBy(presetRows, (r) => r.zoneId);
    for (const zone of zoneRows) {
      out.set(zone.id, buildZoneConfig({ zone, sources: sourcesBy.get(zone.id) ?? [], presets: presetsBy.get(zone.id) ?? [], curves }));
    }
  }
  return out;
}

/** For every zone made from the template: what an update would change, and what it keeps. */
export async function previewTemplateUpdate({ actor, templateId }: { actor: Actor; templateId: string }): Promise<TemplateUpdatePreview> {
  requireLibrary(actor);
  const template = await loadTemplateRow(db, actor, templateId);
  const zoneRows = await db
    .select({
      id: zones.id,
      name: zones.name,
      homeId: homes.id,
      homeName: homes.name,
      organizationId: zones.organizationId,
      version: zones.version,
      templateVersion: zones.templateVersion,
      overrides: zones.overrides,
      guestLocked: zones.guestLocked,
      profile: {
        name: modelProfiles.name,
        presetSlots: modelProfiles.presetSlots,
        eqBands: modelProfiles.eqBands,
        inputs: modelProfiles.inputs,
        subwooferOutputs: modelProfiles.subwooferOutputs,
        hasLineOut: modelProfiles.hasLineOut,
      },
    })
    .from(zones)
    .innerJoin(homes, eq(homes.id, zones.homeId))
    .leftJoin(devices, eq(devices.id, zones.deviceId))
    .leftJoin(modelProfiles, eq(modelProfiles.id, devices.modelProfileId))
    .where(and(eq(zones.templateId, templateId), eq(zones.organizationId, actor.organizationId), isNull(zones.deletedAt)))
    .orderBy(asc(homes.name), asc(zones.position));
  const configs = await loadZoneConfigs(db, zoneRows.map((z) => z.id));
  const out: TemplateUpdatePreviewZone[] = [];
  for (const z of zoneRows) {
    const current = configs.get(z.id)!;
    const merged = mergeTemplateIntoZone({ template: template.config, zone: current, overrides: z.overrides, guestLocked: z.guestLocked });
    const diff = diffZoneConfigs(current, merged.config, { ignore: ["name", "guestControls.locked"] });
    out.push({
      zoneId: z.id,
      zoneName: z.name,
      home: { id: z.homeId, name: z.homeName },
      version: z.version,
      templateVersion: z.templateVersion,
      behind: (z.templateVersion ?? 0) < template.version,
      canApply: can(actor, "template:apply", { id: z.homeId, organizationId: z.organizationId }),
      changes: diff.changes.map(({ op, path, subject, field, beforeText, afterText, text }) => ({ op, path, subject, field, beforeText, afterText, text })),
      kept: merged.kept.map((k) => ({ path: k.path, label: k.label, reason: k.reason, text: keptText(k) })),
      problems: z.profile?.name ? deviceFitProblems(merged.config, z.profile as Parameters<typeof deviceFitProblems>[1]) : [],
    });
  }
  return { template: { id: template.id, name: template.name, version: template.version }, zones: out };
}

export type BulkZoneResult =
  | { zoneId: string; ok: true; version: number; revision: { id: string; number: number; created: boolean }; changeCount: number }
  | { zoneId: string; ok: false; code: string; message: string };

/**
 * Update the chosen zones to the template's current version. Each zone is its own
 * transaction through changeZone (lock, version check, revision, audit), so one
 * stale or refused zone does not hold back the others; each result says which.
 */
export async function applyTemplateUpdate({
  actor,
  templateId,
  input,
}: {
  actor: Actor;
  templateId: string;
  input: BulkUpdateInput;
}): Promise<{ template: { id: string; name: string; version: number }; results: BulkZoneResult[] }> {
  requireLibrary(actor);
  const template = await loadTemplateRow(db, actor, templateId);
  if (template.version !== input.templateVersion) {
    throw new AppError("template:stale", {
      message: "The template changed since this preview. Preview again before updating zones.",
      details: { currentVersion: template.version },
    });
  }
  const results: BulkZoneResult[] = [];
  for (const { zoneId, version } of input.zones) {
    try {
      const r = await changeZone({
        actor,
        zoneId,
        expectedVersion: version,
        action: "template:apply",
        kind: "zone.template-updated",
        templateOverrides: "skip",
        summary: (zone) => `Updated zone “${zone.name}” to template “${template.name}” version ${template.version}`,
        message: `Template “${template.name}” version ${template.version}`,
        apply: async (tx, zone) => {
          if (zone.templateId !== template.id) {
            throw new AppError("zone:rule", { message: `“${zone.name}” is not made from “${template.name}”.` });
          }
          const { merged } = await mergeForZone(tx, template, zone);
          const curves = new CurveResolver(tx, actor, { createdDescription: `Bands as saved in zone template “${template.name}”.` });
          const applied = await applyZoneConfig(tx, { actor, zone, config: merged.config, curves });
          await tx.update(zones).set({ templateVersion: template.version }).where(eq(zones.id, zone.id));
          return [
            ...toAuditChanges(applied.diff),
            { field: "template version", before: zone.templateVersion, after: template.version },
            ...merged.kept.map((k) => ({ field: `kept: ${k.label}`, before: null, after: keptText(k) })),
          ];
        },
      });
      results.push({
        zoneId,
        ok: true,
        version: r.version,
        revision: { id: r.revision.id, number: r.revision.number, created: r.revision.created },
        changeCount: r.changes.filter((c) => !c.field.startsWith("kept: ") && c.field !== "template version").length,
      });
    } catch (error) {
      if (!(error instanceof AppError)) throw error;
      results.push({ zoneId, ok: false, code: error.code, message: error.message });
    }
  }
  return { template: { id: template.id, name: template.name, version: template.version }, results };
}

/** Which fields a zone sets itself (kept on template updates). Not part of the configuration, so no new revision. */
export async function setZoneOverrides({
  actor,
  templateId,
  zoneId,
  version,
  overrides,
}: {
  actor: Actor;
  templateId: string;
  zoneId: string;
  version: number;
  overrides: string[];
}) {
  requireLibrary(actor);
  const template = await loadTemplateRow(db, actor, templateId);
  const next = [...new Set(overrides)].sort();
  const result = await changeZone({
    actor,
    zoneId,
    expectedVersion: version,
    action: "template:apply",
    kind: "zone.template-overrides",
    templateOverrides: "skip",
    summary: (zone) => `Changed which fields “${zone.name}” keeps from template “${template.name}”`,
    apply: async (tx, zone) => {
      if (zone.templateId !== template.id) throw new AppError("zone:not-found");
      await tx.update(zones).set({ overrides: next }).where(eq(zones.id, zone.id));
      return [{ field: "fields set in this zone", before: zone.overrides, after: next }];
    },
  });
  return { zoneId, version: result.version, overrides: next };
}

/** Zones of one home that can be saved as a template (for the "save a zone" dialog). */
export async function listZoneChoices({ actor, homeId }: { actor: Actor; homeId: string }) {
  if (!can(actor, "template:edit")) throw new AppError("auth:forbidden");
  const [home] = await db
    .select({ id: homes.id })
    .from(homes)
    .where(and(eq(homes.id, homeId), eq(homes.organizationId, actor.organizationId)));
  if (!home) throw new AppError("home:not-found");
  const rows = await db
    .select({ id: zones.id, name: zones.name, templateName: zoneTemplates.name })
    .from(zones)
    .leftJoin(zoneTemplates, eq(zoneTemplates.id, zones.templateId))
    .where(and(eq(zones.homeId, homeId), isNull(zones.deletedAt)))
    .orderBy(asc(zones.position), asc(zones.name));
  return { items: rows };
}

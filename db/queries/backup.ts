import "server-only";
import { and, asc, eq, inArray, isNull, or, sql } from "drizzle-orm";
import { db, type Transaction } from "@/db/client";
import { devices, homes, modelProfiles, toneCurveBands, toneCurves, zoneRevisions, zones, zoneTemplates, type Zone } from "@/db/schema";
import { applyZoneConfig, CurveResolver } from "@/db/queries/apply-config";
import { diffFields, recordAudit, type FieldChange } from "@/db/queries/audit";
import { getHomeForActor } from "@/db/queries/homes";
import { changeZoneInTransaction, loadZoneConfig } from "@/db/queries/zone-writes";
import { AppError } from "@/lib/errors";
import { type Actor, can } from "@/lib/permissions";
import {
  BACKUP_FORMAT,
  BACKUP_SCHEMA_VERSION,
  backupContentHash,
  backupFileSchema,
  issuePath,
  type BackupFile,
  type BackupTemplate,
  type BackupZone,
  type ParsedBackup,
} from "@/lib/validation/backup";
import type { ConfigBand, ZoneConfig } from "@/lib/validation/zone-config";
import { diffZoneConfigs, summarizeDiff, toAuditChanges, type ConfigDiff } from "@/lib/zones/config-diff";
import { deviceFitProblems } from "@/lib/zones/config-fits-device";
import { contentHash } from "@/lib/zones/content-hash";

// Home backups: export the whole desired configuration of a home as one
// versioned, hashed JSON document; preview what restoring a file would change,
// zone by zone; and restore it in ONE transaction — every zone, curve, template
// and audit event, or nothing at all.

// ── export ─────────────────────────────────────────────────────────────────

type CurveRef = ZoneConfig["zoneCurve"];

function curveIdsOf(config: ZoneConfig): string[] {
  const refs: CurveRef[] = [config.zoneCurve, ...config.sources.map((s) => s.toneCurve), ...config.presets.map((p) => p.toneCurve)];
  return refs.flatMap((r) => (r?.id ? [r.id] : []));
}

export async function exportHomeBackup({ actor, homeId }: { actor: Actor; homeId: string }): Promise<BackupFile> {
  const home = await getHomeForActor({ actor, homeId });
  if (!can(actor, "backup:export", home)) throw new AppError("auth:forbidden", { message: "Your role may not download home backups." });

  // Repeatable read: every zone is read from the same moment, even while others edit.
  const file = await db.transaction(
    async (tx) => {
      const zoneRows = await tx
        .select({
          id: zones.id,
          position: zones.position,
          templateId: zones.templateId,
          templateVersion: zones.templateVersion,
          overrides: zones.overrides,
          currentRevisionId: zones.currentRevisionId,
          fleetDeviceId: devices.fleetDeviceId,
          serial: devices.serial,
          modelProfileId: devices.modelProfileId,
        })
        .from(zones)
        .leftJoin(devices, eq(devices.id, zones.deviceId))
        .where(and(eq(zones.homeId, homeId), eq(zones.organizationId, actor.organizationId), isNull(zones.deletedAt)))
        .orderBy(asc(zones.position), asc(zones.name), asc(zones.id));
      const revisionIds = zoneRows.flatMap((z) => (z.currentRevisionId ? [z.currentRevisionId] : []));
      const revisionRows = revisionIds.length
        ? await tx
            .select({ id: zoneRevisions.id, number: zoneRevisions.number, contentHash: zoneRevisions.contentHash })
            .from(zoneRevisions)
            .where(inArray(zoneRevisions.id, revisionIds))
        : [];
      const backupZones: BackupZone[] = [];
      for (const z of zoneRows) {
        const config = await loadZoneConfig(tx, z.id);
        const rev = revisionRows.find((r) => r.id === z.currentRevisionId);
        backupZones.push({
          id: z.id,
          position: z.position,
          device: z.fleetDeviceId ? { fleetDeviceId: z.fleetDeviceId, serial: z.serial!, modelProfileId: z.modelProfileId! } : null,
          template: z.templateId ? { id: z.templateId, version: z.templateVersion ?? 1 } : null,
          overrides: [...(z.overrides ?? [])],
          revision: rev ? { number: rev.number, contentHash: rev.contentHash } : null,
          config,
        });
      }

      const templateIds = [...new Set(zoneRows.flatMap((z) => (z.templateId ? [z.templateId] : [])))];
      const templateRows = templateIds.length
        ? await tx
            .select({ id: zoneTemplates.id, name: zoneTemplates.name, description: zoneTemplates.description, version: zoneTemplates.version, config: zoneTemplates.config })
            .from(zoneTemplates)
            .where(and(inArray(zoneTemplates.id, templateIds), eq(zoneTemplates.organizationId, actor.organizationId)))
            .orderBy(asc(zoneTemplates.name), asc(zoneTemplates.id))
        : [];

      const curveIds = [...new Set([...backupZones.flatMap((z) => curveIdsOf(z.config)), ...templateRows.flatMap((t) => curveIdsOf(t.config))])];
      const curveRows = curveIds.length
        ? await tx
            .select({ id: toneCurves.id, name: toneCurves.name, description: toneCurves.description })
            .from(toneCurves)
            .where(and(inArray(toneCurves.id, curveIds), eq(toneCurves.organizationId, actor.organizationId)))
            .orderBy(asc(toneCurves.name), asc(toneCurves.id))
        : [];
      const bandRows = curveRows.length
        ? await tx
            .select()
            .from(toneCurveBands)
            .where(inArray(toneCurveBands.curveId, curveRows.map((c) => c.id)))
            .orderBy(asc(toneCurveBands.position))
        : [];

      const content = {
        schemaVersion: BACKUP_SCHEMA_VERSION,
        home: { id: home.id, name: home.name, householdName: home.householdName, city: home.city, servicePlan: home.servicePlan, notes: home.notes },
        zones: backupZones,
        curves: curveRows.map((c) => ({
          id: c.id,
          name: c.name,
          description: c.description,
          bands: bandRows
            .filter((b) => b.curveId === c.id)
            .map((b): ConfigBand => ({ type: b.type, frequencyHz: b.frequencyHz, gainDb: b.gainDb, q: b.q, enabled: b.enabled })),
        })),
        templates: templateRows.map((t) => ({ id: t.id, name: t.name, description: t.description, version: t.version, config: t.config })),
      };
      const hash = backupContentHash(content as Parameters<typeof backupContentHash>[0]);
      const { schemaVersion, ...body } = content;
      const out = {
        format: BACKUP_FORMAT,
        schemaVersion,
        createdAt: new Date().toISOString(),
        createdBy: { name: actor.name, role: actor.role },
        contentHash: hash,
        ...body,
      };
      await recordAudit(tx, actor, {
        kind: "home.backup-exported",
        summary: `Downloaded a backup of “${home.name}” (${backupZones.length} zone${backupZones.length === 1 ? "" : "s"})`,
        homeId,
        changes: [{ field: "contentHash", before: null, after: hash }],
      });
      return out;
    },
    { isolationLevel: "repeatable read" },
  );

  // A backup that could not be restored is worse than none: check it before handing it out.
  const check = backupFileSchema.safeParse(file);
  if (!check.success) {
    const issue = check.error.issues[0];
    throw new AppError("backup:invalid", {
      message: `This home holds something the backup format cannot carry (${issuePath(issue.path)}: ${issue.message}). Fix it on the zone board, then download again.`,
    });
  }
  return file as BackupFile;
}

// ── templates named by a backup ────────────────────────────────────────────

export type TemplateOutcome = "reattached" | "matched" | "created" | "missing";

export interface TemplateResolution {
  requested: { id: string; name: string | null };
  outcome: TemplateOutcome;
  templateId: string | null;
  templateName: string | null;
  version: number | null;
}

/**
 * For a zone's template reference: the same template by id while its
 * configuration is still the one in the file; else a template with the same
 * configuration; else a new library template from the file.
 */
class TemplateResolver {
  private library: { id: string; name: string; version: number; hash: string }[] | null = null;
  private readonly cache = new Map<string, TemplateResolution>();
  readonly resolutions: TemplateResolution[] = [];

  constructor(
    private readonly tx: Transaction,
    private readonly actor: Actor,
    private readonly fileTemplates: BackupTemplate[],
    private readonly options: { dryRun: boolean; createdDescription: string },
  ) {}

  private async load() {
    if (this.library) return this.library;
    const rows = await this.tx
      .select({ id: zoneTemplates.id, name: zoneTemplates.name, version: zoneTemplates.version, config: zoneTemplates.config })
      .from(zoneTemplates)
      .where(eq(zoneTemplates.organizationId, this.actor.organizationId))
      .orderBy(asc(zoneTemplates.createdAt), asc(zoneTemplates.id));
    this.library = rows.map((r) => ({ id: r.id, name: r.name, version: r.version, hash: contentHash(r.config) }));
    return this.library;
  }

  async resolve(ref: BackupZone["template"]): Promise<TemplateResolution | null> {
    if (!ref) return null;
    const cached = this.cache.get(ref.id);
    if (cached) return cached.outcome === "reattached" ? { ...cached, version: ref.version } : cached;
    const library = await this.load();
    const inFile = this.fileTemplates.find((t) => t.id === ref.id);
    const byId = library.find((t) => t.id === ref.id);
    let resolution: TemplateResolution;
    if (!inFile) {
      resolution = byId
        ? { requested: { id: ref.id, name: null }, outcome: "reattached", templateId: byId.id, templateName: byId.name, version: ref.version }
        : { requested: { id: ref.id, name: null }, outcome: "missing", templateId: null, templateName: null, version: null };
    } else {
      const hash = contentHash(inFile.config);
      if (byId && byId.hash === hash) {
        resolution = { requested: { id: ref.id, name: inFile.name }, outcome: "reattached", templateId: byId.id, templateName: byId.name, version: ref.version };
      } else {
        const match = library.find((t) => t.hash === hash && t.name === inFile.name) ?? library.find((t) => t.hash === hash);
        if (match) {
          resolution = { requested: { id: ref.id, name: inFile.name }, outcome: "matched", templateId: match.id, templateName: match.name, version: match.version };
        } else {
          const taken = library.map((t) => t.name);
          let name = inFile.name;
          if (taken.includes(name)) name = `${inFile.name} (restored)`;
          for (let i = 2; taken.includes(name); i++) name = `${inFile.name} (restored) ${i}`;
          const id = this.options.dryRun ? `new:${inFile.id}` : await this.create(inFile, name);
          library.push({ id, name, version: 1, hash });
          resolution = { requested: { id: ref.id, name: inFile.name }, outcome: "created", templateId: id, templateName: name, version: 1 };
        }
      }
    }
    this.cache.set(ref.id, resolution);
    this.resolutions.push(resolution);
    return resolution;
  }

  private async create(t: BackupTemplate, name: string): Promise<string> {
    const [row] = await this.tx
      .insert(zoneTemplates)
      .values({
        organizationId: this.actor.organizationId,
        name,
        description: t.description || this.options.createdDescription,
        config: t.config,
        createdBy: this.actor.userId,
      })
      .returning({ id: zoneTemplates.id });
    await recordAudit(this.tx, this.actor, {
      kind: "template.created",
      summary: `Created zone template “${name}” (${this.options.createdDescription.replace(/\.$/, "")})`,
      changes: [{ field: "name", before: null, after: name }],
    });
    return row.id;
  }
}

// ── planning (shared by preview and restore) ───────────────────────────────

export type ZoneRestoreAction = "update" | "unchanged" | "revive" | "create";

interface ZonePlan {
  index: number;
  file: BackupZone;
  action: ZoneRestoreAction;
  zone: Zone | null;
  /** For "create": the file's zone id when it is free, else null (a new id). */
  createId: string | null;
  /** For "create"/"revive": the device to bind, when it is free. */
  bindDeviceId: string | null;
  bindDeviceHomeless: boolean;
  current: ZoneConfig | null;
  /** The file's configuration with curve references as they will resolve. */
  expected: ZoneConfig;
  diff: ConfigDiff | null;
  identityChanges: FieldChange[];
  template: TemplateResolution | null;
  notes: string[];
  problems: string[];
}

interface RestorePlan {
  home: { id: string; name: string; version: number };
  homeChanges: FieldChange[];
  zones: ZonePlan[];
  untouched: { id: string; name: string }[];
  token: string;
}

async function profileOf(tx: Transaction, deviceId: string | null) {
  if (!deviceId) return null;
  const [row] = await tx
    .select({
      name: modelProfiles.name,
      presetSlots: modelProfiles.presetSlots,
      eqBands: modelProfiles.eqBands,
      inputs: modelProfiles.inputs,
      subwooferOutputs: modelProfiles.subwooferOutputs,
      hasLineOut: modelProfiles.hasLineOut,
    })
    .from(devices)
    .innerJoin(modelProfiles, eq(modelProfiles.id, devices.modelProfileId))
    .where(eq(devices.id, deviceId));
  return row ?? null;
}

async function withResolvedCurves(config: ZoneConfig, curves: CurveResolver): Promise<ZoneConfig> {
  const resolve = async (ref: CurveRef): Promise<CurveRef> => {
    if (!ref) return null;
    const id = await curves.resolve(ref);
    const r = curves.resolutions.find((x) => x.curveId === id)!;
    return { id: id && !id.startsWith("new:") ? id : null, name: r.curveName, bands: ref.bands.map((b) => ({ ...b })) };
  };
  return {
    ...config,
    zoneCurve: await resolve(config.zoneCurve),
    sources: await Promise.all(config.sources.map(async (s) => ({ ...s, toneCurve: await resolve(s.toneCurve) }))),
    presets: await Promise.all(config.presets.map(async (p) => ({ ...p, toneCurve: await resolve(p.toneCurve) }))),
  };
}

async function planRestore(
  tx: Transaction,
  actor: Actor,
  homeId: string,
  backup: BackupFile,
  resolvers: { curves: CurveResolver; templates: TemplateResolver },
): Promise<RestorePlan> {
  const [home] = await tx
    .select()
    .from(homes)
    .where(and(eq(homes.id, homeId), eq(homes.organizationId, actor.organizationId)));
  if (!home) throw new AppError("home:not-found");
  if (backup.home.id !== home.id) {
    throw new AppError("backup:invalid", {
      message: `This backup is of the home “${backup.home.name}”, not “${home.name}”. Restore it into the home it was made from.`,
    });
  }
  const { id: _id, ...homeFields } = backup.home;
  const homeChanges = diffFields(home as unknown as Record<string, unknown>, homeFields);

  const fileIds = backup.zones.map((z) => z.id);
  const zoneRows = await tx
    .select()
    .from(zones)
    .where(or(eq(zones.homeId, homeId), inArray(zones.id, fileIds)))
    .orderBy(asc(zones.id));
  const deviceRows = await tx
    .select({ id: devices.id, homeId: devices.homeId, fleetDeviceId: devices.fleetDeviceId, serial: devices.serial })
    .from(devices)
    .where(
      and(
        eq(devices.organizationId, actor.organizationId),
        inArray(devices.fleetDeviceId, backup.zones.flatMap((z) => (z.device ? [z.device.fleetDeviceId] : [])).concat([""])),
      ),
    );
  const liveDeviceHolders = await tx
    .select({ deviceId: zones.deviceId, name: zones.name, id: zones.id })
    .from(zones)
    .where(and(inArray(zones.deviceId, deviceRows.map((d) => d.id).concat(["00000000-0000-0000-0000-000000000000"])), isNull(zones.deletedAt)));

  const plans: ZonePlan[] = [];
  for (const [index, file] of backup.zones.entries()) {
    const row = zoneRows.find((z) => z.id === file.id);
    const mine = row && row.homeId === homeId && row.organizationId === actor.organizationId;
    const notes: string[] = [];
    const problems: string[] = [];
    const expected = await withResolvedCurves(file.config, resolvers.curves);
    const template = await resolvers.templates.resolve(file.template);
    if (template?.outcome === "missing") notes.push("Its zone template is neither in the file nor in the library; the zone is restored without it.");

    let action: ZoneRestoreAction;
    let bindDeviceId: string | null = null;
    let bindDeviceHomeless = false;
    if (mine && !row.deletedAt) {
      action = "update";
      if (file.device && row.deviceId) {
        const d = deviceRows.find((x) => x.fleetDeviceId === file.device!.fleetDeviceId);
        if (!d || d.id !== row.deviceId) notes.push(`The backup names device ${file.device.serial}; the zone keeps the device it has now.`);
      }
    } else {
      action = mine ? "revive" : "create";
      if (row && !mine) notes.push("A zone with this id exists elsewhere; this one is created with a new id.");
      if (file.device) {
        const d = deviceRows.find((x) => x.fleetDeviceId === file.device!.fleetDeviceId);
        const holder = d ? liveDeviceHolders.find((h) => h.deviceId === d.id && h.id !== file.id) : undefined;
        if (!d) notes.push(`Device ${file.device.serial} is not in this company; the zone is restored without a device.`);
        else if (d.homeId && d.homeId !== homeId) notes.push(`Device ${file.device.serial} now serves another home; the zone is restored without a device.`);
        else if (holder) notes.push(`Device ${file.device.serial} now serves the zone “${holder.name}”; the zone is restored without a device.`);
        else {
          bindDeviceId = d.id;
          bindDeviceHomeless = d.homeId === null;
        }
      }
    }

    const zone = mine ? row : null;
    const current = zone ? await loadZoneConfig(tx, zone.id) : null;
    const profile = await profileOf(tx, action === "update" || (action === "revive" && !bindDeviceId) ? (zone?.deviceId ?? null) : bindDeviceId);
    if (profile) problems.push(...deviceFitProblems(expected, profile));

    const identityChanges: FieldChange[] = [];
    if (zone) {
      if (zone.position !== file.position) identityChanges.push({ field: "position", before: zone.position, after: file.position });
      const templateId = template?.templateId ?? null;
      const templateVersion = template?.version ?? null;
      if (zone.templateId !== templateId || zone.templateVersion !== templateVersion) {
        identityChanges.push({ field: "template", before: zone.templateId ? `${zone.templateId} v${zone.templateVersion}` : null, after: templateId ? `${template!.templateName} v${templateVersion}` : null });
      }
      if (JSON.stringify(zone.overrides ?? []) !== JSON.stringify(file.overrides)) identityChanges.push({ field: "overrides", before: zone.overrides, after: file.overrides });
    }
    const diff = current ? diffZoneConfigs(current, expected) : null;
    if (action === "update" && diff?.identical && identityChanges.length === 0) action = "unchanged";
    plans.push({
      index,
      file,
      action,
      zone,
      createId: action === "create" && !row ? file.id : null,
      bindDeviceId,
      bindDeviceHomeless,
      current,
      expected,
      diff,
      identityChanges,
      template,
      notes,
      problems,
    });
  }

  const untouched = zoneRows
    .filter((z) => z.homeId === homeId && !z.deletedAt && !fileIds.includes(z.id))
    .map((z) => ({ id: z.id, name: z.name }));
  // What the preview saw: the file, the home and every zone it could touch, by version.
  const token = contentHash({
    backup: backup.contentHash,
    home: home.version,
    zones: zoneRows.map((z) => [z.id, z.version, z.deletedAt ? 1 : 0]),
  }).slice(7, 39);
  return { home: { id: home.id, name: home.name, version: home.version }, homeChanges, zones: plans, untouched, token };
}

// ── preview ────────────────────────────────────────────────────────────────

export interface ZonePreviewDto {
  index: number;
  fileZoneId: string;
  zoneId: string | null;
  name: string;
  action: ZoneRestoreAction;
  summary: string;
  diff: ConfigDiff | null;
  identityChanges: FieldChange[];
  notes: string[];
  problems: string[];
}

export interface RestorePreviewDto {
  backup: { createdAt: string; createdBy: string | null; schemaVersion: number; migratedFrom: number | null; contentHash: string; zoneCount: number };
  home: { id: string; name: string; changes: FieldChange[] };
  zones: ZonePreviewDto[];
  untouched: { id: string; name: string }[];
  curves: { requestedName: string; name: string; outcome: string }[];
  templates: { requestedName: string | null; name: string | null; outcome: string }[];
  canApply: boolean;
  previewToken: string;
}

function assertMayRestore(actor: Actor, home: { id: string; organizationId: string }) {
  if (!can(actor, "backup:restore", home)) throw new AppError("auth:forbidden", { message: "Your role may not restore home backups." });
}

function describeCreate(config: ZoneConfig): string {
  return `New zone with ${config.sources.length} source${config.sources.length === 1 ? "" : "s"} and ${config.presets.length} stream preset${config.presets.length === 1 ? "" : "s"}`;
}

export async function previewHomeRestore({
  actor,
  homeId,
  parsed,
}: {
  actor: Actor;
  homeId: string;
  parsed: ParsedBackup;
}): Promise<RestorePreviewDto> {
  const home = await getHomeForActor({ actor, homeId });
  assertMayRestore(actor, home);
  const { backup } = parsed;
  // Planned in a transaction that is always rolled back: a preview writes nothing.
  let result: RestorePreviewDto | null = null;
  await db
    .transaction(
      async (tx) => {
        const curves = new CurveResolver(tx, actor, { createdDescription: "", dryRun: true });
        const templates = new TemplateResolver(tx, actor, backup.templates, { dryRun: true, createdDescription: "" });
        const plan = await planRestore(tx, actor, homeId, backup, { curves, templates });
        result = {
          backup: {
            createdAt: backup.createdAt,
            createdBy: backup.createdBy ? `${backup.createdBy.name} (${backup.createdBy.role})` : null,
            schemaVersion: parsed.migratedFrom ?? backup.schemaVersion,
            migratedFrom: parsed.migratedFrom,
            contentHash: backup.contentHash,
            zoneCount: backup.zones.length,
          },
          home: { id: plan.home.id, name: plan.home.name, changes: plan.homeChanges },
          zones: plan.zones.map((z) => ({
            index: z.index,
            fileZoneId: z.file.id,
            zoneId: z.zone?.id ?? null,
            name: z.file.config.name,
            action: z.action,
            summary:
              z.action === "create"
                ? describeCreate(z.expected)
                : z.action === "revive"
                  ? `Brought back from deletion${z.diff && !z.diff.identical ? `; ${summarizeDiff(z.diff).toLowerCase()}` : ""}`
                  : z.diff
                    ? summarizeDiff(z.diff) + (z.identityChanges.length ? ` (+ ${z.identityChanges.map((c) => c.field).join(", ")})` : "")
                    : "",
            diff: z.diff,
            identityChanges: z.identityChanges,
            notes: z.notes,
            problems: z.problems,
          })),
          untouched: plan.untouched,
          curves: curves.resolutions.map((r) => ({ requestedName: r.requested.name, name: r.curveName, outcome: r.outcome })),
          templates: templates.resolutions.map((r) => ({ requestedName: r.requested.name, name: r.templateName, outcome: r.outcome })),
          canApply: plan.zones.every((z) => z.problems.length === 0),
          previewToken: plan.token,
        };
        throw new RollbackPreview();
      },
      { accessMode: "read only" },
    )
    .catch((error) => {
      if (!(error instanceof RollbackPreview)) throw error;
    });
  return result!;
}

class RollbackPreview extends Error {}

// ── restore ────────────────────────────────────────────────────────────────

export interface RestoreResultDto {
  home: { id: string; name: string; changed: boolean };
  zones: { zoneId: string; name: string; action: ZoneRestoreAction; revision: { number: number; contentHash: string; created: boolean } | null }[];
  curves: { requestedName: string; name: string; outcome: string }[];
  templates: { requestedName: string | null; name: string | null; outcome: string }[];
}

export async function restoreHomeBackup({
  actor,
  homeId,
  parsed,
  previewToken,
}: {
  actor: Actor;
  homeId: string;
  parsed: ParsedBackup;
  /** The token of the preview the person saw; when given, a change since then refuses the restore. */
  previewToken?: string | null;
}): Promise<RestoreResultDto> {
  const homeRef = await getHomeForActor({ actor, homeId });
  assertMayRestore(actor, homeRef);
  const { backup } = parsed;
  const made = backup.createdAt.slice(0, 16).replace("T", " ");

  return db.transaction(async (tx) => {
    // Lock the home and every zone the file could touch, in id order, so a
    // concurrent edit either lands before us (and the token differs) or waits.
    await tx.select({ id: homes.id }).from(homes).where(and(eq(homes.id, homeId), eq(homes.organizationId, actor.organizationId))).for("update");
    await tx
      .select({ id: zones.id })
      .from(zones)
      .where(or(eq(zones.homeId, homeId), inArray(zones.id, backup.zones.map((z) => z.id))))
      .orderBy(asc(zones.id))
      .for("update");

    const curveDescriptions = new Map(backup.curves.map((c) => [c.id, c.description] as const));
    const curves = new CurveResolver(tx, actor, {
      createdDescription: `Recreated from a backup of “${homeRef.name}” made ${made} UTC.`,
      descriptions: curveDescriptions,
    });
    const templates = new TemplateResolver(tx, actor, backup.templates, {
      dryRun: false,
      createdDescription: `Recreated from a backup of “${homeRef.name}” made ${made} UTC.`,
    });
    const plan = await planRestore(tx, actor, homeId, backup, { curves, templates });
    if (previewToken && previewToken !== plan.token) throw new AppError("backup:stale-preview");

    if (plan.homeChanges.length) {
      const { id: _id, ...fields } = backup.home;
      await tx
        .update(homes)
        .set({ ...fields, version: sql`${homes.version} + 1`, updatedAt: new Date() })
        .where(eq(homes.id, homeId));
      await recordAudit(tx, actor, {
        kind: "home.updated",
        summary: `Updated home “${backup.home.name}” from a backup`,
        homeId,
        changes: plan.homeChanges,
      });
    }

    const results: RestoreResultDto["zones"] = [];
    for (const p of plan.zones) {
      const name = p.file.config.name;
      if (p.action === "unchanged") {
        results.push({ zoneId: p.zone!.id, name, action: p.action, revision: null });
        continue;
      }
      let zoneId: string;
      if (p.action === "create") {
        const [row] = await tx
          .insert(zones)
          .values({
            ...(p.createId ? { id: p.createId } : {}),
            organizationId: actor.organizationId,
            homeId,
            deviceId: p.bindDeviceId,
            name,
            position: p.file.position,
            deviceSettings: structuredClone(p.file.config.deviceSettings),
            outputLayout: structuredClone(p.file.config.outputLayout),
            templateId: p.template?.templateId ?? null,
            templateVersion: p.template?.version ?? null,
            overrides: [...p.file.overrides],
          })
          .returning({ id: zones.id });
        zoneId = row.id;
        await recordAudit(tx, actor, {
          kind: "zone.created",
          summary: `Created zone “${name}” from a backup`,
          homeId,
          zoneId,
          changes: [
            { field: "name", before: null, after: name },
            ...(p.bindDeviceId ? [{ field: "device", before: null, after: p.file.device!.serial }] : []),
          ],
        });
      } else if (p.action === "revive") {
        zoneId = p.zone!.id;
        await tx.update(zones).set({ deletedAt: null, deviceId: p.bindDeviceId }).where(eq(zones.id, zoneId));
        await recordAudit(tx, actor, {
          kind: "zone.revived",
          summary: `Brought back zone “${name}” from a backup`,
          homeId,
          zoneId,
          changes: [
            { field: "deletedAt", before: p.zone!.deletedAt?.toISOString() ?? null, after: null },
            ...(p.bindDeviceId ? [{ field: "device", before: null, after: p.file.device!.serial }] : []),
          ],
        });
      } else {
        zoneId = p.zone!.id;
      }
      if (p.bindDeviceId && p.bindDeviceHomeless) await tx.update(devices).set({ homeId }).where(eq(devices.id, p.bindDeviceId));

      const result = await changeZoneInTransaction(tx, {
        actor,
        zoneId,
        expectedVersion: null,
        action: "zone:edit",
        kind: "zone.restored-from-backup",
        templateOverrides: "skip",
        summary: `Restored “${name}” from a backup made ${made} UTC`,
        message: `Restored from a backup made ${made} UTC`,
        apply: async (tx2, zone) => {
          const identity: FieldChange[] = p.action === "update" ? p.identityChanges : [];
          await tx2
            .update(zones)
            .set({
              position: p.file.position,
              templateId: p.template?.templateId ?? null,
              templateVersion: p.template?.version ?? null,
              overrides: [...p.file.overrides],
            })
            .where(eq(zones.id, zone.id));
          const applied = await applyZoneConfig(tx2, {
            actor,
            zone,
            config: p.file.config,
            curves,
            lockReason: `Locked by a backup restore (${made} UTC)`,
          });
          return [...identity, ...toAuditChanges(applied.diff)];
        },
      });
      results.push({ zoneId, name, action: p.action, revision: result.revision });
    }

    const count = (a: ZoneRestoreAction) => results.filter((r) => r.action === a).length;
    await recordAudit(tx, actor, {
      kind: "home.backup-restored",
      summary: `Restored “${backup.home.name}” from a backup made ${made} UTC: ${count("update")} zone(s) changed, ${count("create")} created, ${count("revive")} brought back, ${count("unchanged")} unchanged`,
      homeId,
      changes: [
        { field: "backup", before: null, after: backup.contentHash },
        ...(parsed.migratedFrom !== null ? [{ field: "schemaVersion", before: parsed.migratedFrom, after: BACKUP_SCHEMA_VERSION }] : []),
      ],
    });

    return {
      home: { id: homeId, name: backup.home.name, changed: plan.homeChanges.length > 0 },
      zones: results,
      curves: curves.resolutions.map((r) => ({ requestedName: r.requested.name, name: r.curveName, outcome: r.outcome })),
      templates: templates.resolutions.map((r) => ({ requestedName: r.requested.name, name: r.templateName, outcome: r.outcome })),
    };
  });
}

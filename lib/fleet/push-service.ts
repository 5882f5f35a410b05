import "server-only";
import { and, asc, eq, inArray, isNull, sql, type SQL } from "drizzle-orm";
import { db, type Transaction } from "@/db/client";
import { devices, homes, modelProfiles, pushes, pushTargets, zoneRevisions, zones, zoneTemplates } from "@/db/schema";
import { applyZoneConfig, CurveResolver } from "@/db/queries/apply-config";
import { recordAudit } from "@/db/queries/audit";
import { finishPushIfDone } from "@/db/queries/push-targets";
import { changeZone, changeZoneInTransaction, loadZoneForActor } from "@/db/queries/zone-writes";
import { AppError } from "@/lib/errors";
import { checkCapabilities, type CapabilityProblem, type CapabilityProfile } from "@/lib/zones/config-fits-device";
import { computeDrift, normalizeConfig } from "@/lib/fleet/drift";
import { idempotencyKey, nextGeneration } from "@/lib/fleet/push-state";
import { QUEUES, withJobs } from "@/lib/fleet/queue";
import { type Actor, can, mayEver, type HomeRef } from "@/lib/permissions";
import { diffZoneConfigs, summarizeDiff, toAuditChanges } from "@/lib/zones/config-diff";
import type { ZoneConfig } from "@/lib/validation/zone-config";
import type { PushScope } from "@/lib/validation/pushes";

// Starting pushes: work out the zones of a scope (one zone, a home, a selection
// across homes, every zone made from a template, a rollback, a household change),
// preview per zone what will change and what the device cannot take, then create
// the push, its targets and their jobs in one audited transaction. Also retry of
// failed targets, cancelling what was not sent yet, and adopting reported state.

type Executor = Transaction | typeof db;

export type PreviewOutcome = "push" | "refused" | "skipped" | "unchanged";

export interface PreviewChangeDto {
  op: string;
  subject: string;
  field: string;
  /** What the device last reported ("none" before its first report). */
  reported: string;
  /** What the push will set. */
  pushed: string;
  text: string;
}

export interface PreviewZoneDto {
  zoneId: string;
  zoneName: string;
  homeId: string;
  homeName: string;
  device: { id: string; serial: string; modelName: string; online: boolean } | null;
  revision: { id: string; number: number } | null;
  outcome: PreviewOutcome;
  /** Why refused or skipped (sentences). */
  reasons: string[];
  problems: CapabilityProblem[];
  /** Things to know that do not stop the push (device offline…). */
  warnings: string[];
  /** Last reported → after the push, field by field. */
  changes: PreviewChangeDto[];
  firstPush: boolean;
  summary: string;
}

export interface PushPreviewDto {
  scope: { kind: PushScope["kind"]; label: string };
  zones: PreviewZoneDto[];
  counts: Record<PreviewOutcome, number>;
}

export interface StartPushResultDto {
  pushId: string;
  scopeLabel: string;
  targetCount: number;
  counts: Record<PreviewOutcome, number>;
  /** Set when a rollback also restored the revision as the zone's desired configuration. */
  restoredRevision: { id: string; number: number } | null;
}

interface ScopeRow {
  zoneId: string;
  zoneName: string;
  homeId: string;
  homeName: string;
  organizationId: string;
  revisionId: string | null;
  revisionNumber: number | null;
  config: ZoneConfig | null;
  deviceId: string | null;
  serial: string | null;
  online: boolean | null;
  reportedConfig: ZoneConfig | null;
  reportedVersion: number | null;
  desiredVersion: number | null;
  profile: CapabilityProfile | null;
}

interface ResolvedScope {
  label: string;
  rows: ScopeRow[];
  /** The one home a zone/home/rollback/household scope is about. */
  homeId: string | null;
}

const previewChangeLimit = 200;

function rowColumns() {
  return {
    zoneId: zones.id,
    zoneName: zones.name,
    homeId: zones.homeId,
    homeName: homes.name,
    organizationId: zones.organizationId,
    revisionId: zoneRevisions.id,
    revisionNumber: zoneRevisions.number,
    config: zoneRevisions.config,
    deviceId: devices.id,
    serial: devices.serial,
    online: devices.online,
    reportedConfig: devices.reportedConfig,
    reportedVersion: devices.reportedVersion,
    desiredVersion: devices.desiredVersion,
    profileName: modelProfiles.name,
    presetSlots: modelProfiles.presetSlots,
    eqBands: modelProfiles.eqBands,
    inputs: modelProfiles.inputs,
    subwooferOutputs: modelProfiles.subwooferOutputs,
    hasLineOut: modelProfiles.hasLineOut,
  };
}

async function loadRows(tx: Executor, where: SQL, { lock, revisionId }: { lock: boolean; revisionId?: string }): Promise<ScopeRow[]> {
  const base = tx
    .select(rowColumns())
    .from(zones)
    .innerJoin(homes, eq(homes.id, zones.homeId))
    .leftJoin(
      zoneRevisions,
      revisionId ? and(eq(zoneRevisions.id, revisionId), eq(zoneRevisions.zoneId, zones.id)) : eq(zoneRevisions.id, zones.currentRevisionId),
    )
    .leftJoin(devices, eq(devices.id, zones.deviceId))
    .leftJoin(modelProfiles, eq(modelProfiles.id, devices.modelProfileId))
    .where(and(where, isNull(zones.deletedAt)))
    .orderBy(asc(homes.name), asc(zones.position), asc(zones.name));
  // Locking the zone rows serialises two pushes of the same zones (no two identical targets in flight).
  const rows = lock ? await base.for("update", { of: zones }) : await base;
  return rows.map((r) => ({
    zoneId: r.zoneId,
    zoneName: r.zoneName,
    homeId: r.homeId,
    homeName: r.homeName,
    organizationId: r.organizationId,
    revisionId: r.revisionId,
    revisionNumber: r.revisionNumber,
    config: r.config,
    deviceId: r.deviceId,
    serial: r.serial,
    online: r.online,
    reportedConfig: r.reportedConfig ?? null,
    reportedVersion: r.reportedVersion,
    desiredVersion: r.desiredVersion,
    profile:
      r.profileName === null
        ? null
        : {
            name: r.profileName,
            presetSlots: r.presetSlots!,
            eqBands: r.eqBands!,
            inputs: r.inputs!,
            subwooferOutputs: r.subwooferOutputs!,
            hasLineOut: r.hasLineOut!,
          },
  }));
}

async function loadHome(tx: Executor, actor: Actor, homeId: string) {
  const [home] = await tx
    .select({ id: homes.id, organizationId: homes.organizationId, name: homes.name })
    .from(homes)
    .where(and(eq(homes.id, homeId), eq(homes.organizationId, actor.organizationId)));
  if (!home || !can(actor, "home:read", home)) throw new AppError("home:not-found");
  return home;
}

/** The zones of a scope, each with the revision to push and its device's state. */
async function resolveScope(tx: Executor, actor: Actor, scope: PushScope, lock: boolean): Promise<ResolvedScope> {
  const org = eq(zones.organizationId, actor.organizationId);
  switch (scope.kind) {
    case "zone": {
      const rows = await loadRows(tx, and(org, eq(zones.id, scope.zoneId))!, { lock });
      const row = rows[0];
      if (!row || !can(actor, "zone:read", { id: row.homeId, organizationId: row.organizationId })) throw new AppError("zone:not-found");
      return { label: `${row.zoneName} · ${row.homeName}`, rows, homeId: row.homeId };
    }
    case "home": {
      const home = await loadHome(tx, actor, scope.homeId);
      const rows = await loadRows(tx, and(org, eq(zones.homeId, home.id))!, { lock });
      return { label: home.name, rows, homeId: home.id };
    }
    case "household": {
      const home = await loadHome(tx, actor, scope.homeId);
      const filter = scope.zoneIds ? and(org, eq(zones.homeId, home.id), inArray(zones.id, scope.zoneIds)) : and(org, eq(zones.homeId, home.id));
      const rows = await loadRows(tx, filter!, { lock });
      if (scope.zoneIds && rows.length !== new Set(scope.zoneIds).size) throw new AppError("zone:not-found");
      return { label: `${home.name} (household change)`, rows, homeId: home.id };
    }
    case "selection": {
      const rows = (await loadRows(tx, and(org, inArray(zones.id, scope.zoneIds))!, { lock })).filter((r) =>
        can(actor, "zone:read", { id: r.homeId, organizationId: r.organizationId }),
      );
      if (rows.length !== scope.zoneIds.length) {
        throw new AppError("zone:not-found", {
          message: `${scope.zoneIds.length - rows.length} of the chosen zones no longer exist or are not yours to see.`,
        });
      }
      const homeCount = new Set(rows.map((r) => r.homeId)).size;
      return {
        label: `${rows.length} zone${rows.length === 1 ? "" : "s"} in ${homeCount} home${homeCount === 1 ? "" : "s"}`,
        rows,
        homeId: homeCount === 1 ? rows[0].homeId : null,
      };
    }
    case "template": {
      const [template] = await tx
        .select({ id: zoneTemplates.id, name: zoneTemplates.name })
        .from(zoneTemplates)
        .where(and(eq(zoneTemplates.id, scope.templateId), eq(zoneTemplates.organizationId, actor.organizationId)));
      if (!template || !can(actor, "library:read")) throw new AppError("template:not-found");
      const rows = await loadRows(tx, and(org, eq(zones.templateId, template.id))!, { lock });
      return { label: `Zones made from “${template.name}”`, rows, homeId: null };
    }
    case "rollback": {
      const rows = await loadRows(tx, and(org, eq(zones.id, scope.zoneId))!, { lock, revisionId: scope.revisionId });
      const row = rows[0];
      if (!row || !can(actor, "zone:read", { id: row.homeId, organizationId: row.organizationId })) throw new AppError("zone:not-found");
      if (!row.revisionId) throw new AppError("revision:not-found");
      return { label: `${row.zoneName} · ${row.homeName}: revision ${row.revisionNumber}`, rows, homeId: row.homeId };
    }
  }
}

interface Extras {
  /** `${zoneId}|${revisionId}` → the push already carrying that revision to that zone. */
  inFlight: Map<string, string>;
  /** `${revisionId}|${deviceId}` pairs the device has applied before. */
  knownGood: Set<string>;
}

async function loadExtras(tx: Executor, rows: ScopeRow[], needKnownGood: boolean): Promise<Extras> {
  const zoneIds = rows.map((r) => r.zoneId);
  const inFlight = new Map<string, string>();
  const knownGood = new Set<string>();
  if (zoneIds.length === 0) return { inFlight, knownGood };
  for (let i = 0; i < zoneIds.length; i += 5000) {
    const chunk = zoneIds.slice(i, i + 5000);
    const active = await tx
      .select({ zoneId: pushTargets.zoneId, revisionId: pushTargets.revisionId, pushId: pushTargets.pushId })
      .from(pushTargets)
      .where(and(inArray(pushTargets.zoneId, chunk), inArray(pushTargets.state, ["queued", "sending", "awaiting_report"])));
    for (const a of active) inFlight.set(`${a.zoneId}|${a.revisionId}`, a.pushId);
    if (needKnownGood) {
      const applied = await tx
        .selectDistinct({ revisionId: pushTargets.revisionId, deviceId: pushTargets.deviceId })
        .from(pushTargets)
        .where(and(inArray(pushTargets.zoneId, chunk), eq(pushTargets.state, "applied")));
      for (const a of applied) knownGood.add(`${a.revisionId}|${a.deviceId}`);
    }
  }
  return { inFlight, knownGood };
}

function homeRef(row: { homeId: string; organizationId: string }): HomeRef {
  return { id: row.homeId, organizationId: row.organizationId };
}

/** May the actor push this revision to this zone's device? Null when yes, else the reason. */
function pushRefusal(actor: Actor, kind: PushScope["kind"], row: ScopeRow, extras: Extras): string | null {
  const home = homeRef(row);
  if (kind === "household") {
    return can(actor, "preset:reorder", home) || can(actor, "push:create", home) ? null : `Your role may not push to ${row.homeName}.`;
  }
  if (can(actor, "push:create", home)) return null;
  if (can(actor, "push:repush", home)) {
    if (row.revisionId && row.deviceId && extras.knownGood.has(`${row.revisionId}|${row.deviceId}`)) return null;
    return `Your role may re-push only a revision this device has applied before; revision ${row.revisionNumber ?? "?"} has not been applied to it.`;
  }
  return actor.role === "installer" ? `${row.homeName} is not one of the homes you are assigned to.` : `Your role may not push to ${row.homeName}.`;
}

function previewZone(actor: Actor, kind: PushScope["kind"], row: ScopeRow, extras: Extras): PreviewZoneDto {
  const base = {
    zoneId: row.zoneId,
    zoneName: row.zoneName,
    homeId: row.homeId,
    homeName: row.homeName,
    device: row.deviceId
      ? { id: row.deviceId, serial: row.serial!, modelName: row.profile?.name ?? "Unknown model", online: row.online! }
      : null,
    revision: row.revisionId ? { id: row.revisionId, number: row.revisionNumber! } : null,
  };
  const refuse = (reasons: string[], problems: CapabilityProblem[] = []): PreviewZoneDto => ({
    ...base,
    outcome: "refused",
    reasons,
    problems,
    warnings: [],
    changes: [],
    firstPush: false,
    summary: reasons[0] ?? "Refused",
  });

  const refusal = pushRefusal(actor, kind, row, extras);
  if (refusal) return refuse([refusal]);
  if (!row.deviceId) return refuse(["No device is bound to this zone. Bind a device before pushing."]);
  const config = row.config ? normalizeConfig(row.config) : null;
  if (!row.revisionId || !config) return refuse(["This zone has no saved revision that can be pushed."]);
  if (!row.profile) return refuse(["The device’s model profile is unknown, so what it can take cannot be checked."]);
  const problems = checkCapabilities(config, row.profile);
  if (problems.length) return refuse(problems.map((p) => p.message), problems);

  const reported = row.reportedConfig ? normalizeConfig(row.reportedConfig) : null;
  const diff = reported ? diffZoneConfigs(reported, config) : null;
  const changes: PreviewChangeDto[] = (diff?.changes ?? []).slice(0, previewChangeLimit).map((c) => ({
    op: c.op,
    subject: c.subject,
    field: c.field,
    reported: c.beforeText,
    pushed: c.afterText,
    text: c.text,
  }));
  const firstPush = reported === null;
  const summary = firstPush ? "First push: the device has not reported a configuration yet" : summarizeDiff(diff!);

  // The same revision already on its way (a second click, a second tab): do not send it twice.
  // A newer revision does go out; it supersedes the one under way.
  const activePush = extras.inFlight.get(`${row.zoneId}|${row.revisionId}`);
  if (activePush) {
    return {
      ...base,
      outcome: "skipped",
      reasons: [`Revision ${row.revisionNumber} of this zone is already on its way in another push; wait for it or cancel it.`],
      problems: [],
      warnings: [],
      changes,
      firstPush,
      summary,
    };
  }

  const warnings: string[] = [];
  if (!row.online) warnings.push("The device is offline: it takes the configuration when it reconnects (the target fails if it does not report in time).");

  const explicit = kind === "zone" || kind === "rollback";
  const drift = computeDrift({
    desired: config,
    device: { online: row.online!, reportedConfig: reported, reportedVersion: row.reportedVersion!, desiredVersion: row.desiredVersion! },
    pushInFlight: false,
  });
  if (!explicit && drift.state === "in_sync") {
    return { ...base, outcome: "unchanged", reasons: ["The device already reports this configuration."], problems: [], warnings, changes, firstPush, summary: "No change" };
  }
  return { ...base, outcome: "push", reasons: [], problems: [], warnings, changes, firstPush, summary: diff?.identical ? "Same as reported: pushed again" : summary };
}

function countOutcomes(list: PreviewZoneDto[]): Record<PreviewOutcome, number> {
  const counts: Record<PreviewOutcome, number> = { push: 0, refused: 0, skipped: 0, unchanged: 0 };
  for (const z of list) counts[z.outcome] += 1;
  return counts;
}

/** Refuses a scope the actor may never push at all (before any zone is looked at). */
function assertMayPushScope(actor: Actor, scope: PushScope) {
  if (scope.kind === "household") {
    if (!mayEver(actor, "preset:reorder") && !mayEver(actor, "push:create")) throw new AppError("auth:forbidden");
    return;
  }
  if (!mayEver(actor, "push:create") && !mayEver(actor, "push:repush")) {
    throw new AppError("auth:forbidden", { message: "Your role may not push configurations to devices." });
  }
  if (scope.kind === "rollback" && scope.restore && !mayEver(actor, "zone:edit")) {
    throw new AppError("auth:forbidden", { message: "Your role may not make an earlier revision the desired configuration; push it without restoring instead." });
  }
}

/** A single-home scope the actor may not push to at all is a 403, not a list of refusals. */
function assertMayPushHome(actor: Actor, scope: PushScope, resolved: ResolvedScope) {
  if (!resolved.homeId || resolved.rows.length === 0) return;
  const home = homeRef(resolved.rows[0]);
  const allowed =
    scope.kind === "household"
      ? can(actor, "preset:reorder", home) || can(actor, "push:create", home)
      : can(actor, "push:create", home) || can(actor, "push:repush", home);
  if (!allowed) {
    throw new AppError("auth:forbidden", {
      message: actor.role === "installer" ? `${resolved.rows[0].homeName} is not one of the homes you are assigned to.` : undefined,
    });
  }
}

/** What a push of this scope would do, zone by zone. Writes nothing. */
export async function previewPush({ actor, scope }: { actor: Actor; scope: PushScope }): Promise<PushPreviewDto> {
  assertMayPushScope(actor, scope);
  const resolved = await resolveScope(db, actor, scope, false);
  assertMayPushHome(actor, scope, resolved);
  const extras = await loadExtras(db, resolved.rows, !resolved.rows.every((r) => can(actor, "push:create", homeRef(r))));
  const list = resolved.rows.map((r) => previewZone(actor, scope.kind, r, extras));
  return { scope: { kind: scope.kind, label: resolved.label }, zones: list, counts: countOutcomes(list) };
}

export interface StartPushInput {
  actor: Actor;
  scope: PushScope;
  /** zoneId → revisionId the person saw in the preview; a mismatch refuses the push (409). */
  expectedRevisions?: Record<string, string>;
  note?: string;
}

/** Restores an earlier revision as the desired configuration, inside the push's transaction. */
async function restoreForRollback(tx: Transaction, actor: Actor, scope: Extract<PushScope, { kind: "rollback" }>) {
  const zone = await loadZoneForActor({ actor, zoneId: scope.zoneId, tx });
  const [revision] = await tx
    .select({ id: zoneRevisions.id, number: zoneRevisions.number, config: zoneRevisions.config, contentHash: zoneRevisions.contentHash })
    .from(zoneRevisions)
    .where(and(eq(zoneRevisions.id, scope.revisionId), eq(zoneRevisions.zoneId, zone.id)));
  if (!revision) throw new AppError("revision:not-found");
  if (zone.currentRevisionId === revision.id) return null;
  const config = normalizeConfig(revision.config);
  if (!config) throw new AppError("zone:rule", { message: `Revision ${revision.number} is stored in a format this version cannot read.` });
  const result = await changeZoneInTransaction(tx, {
    actor,
    zoneId: zone.id,
    expectedVersion: scope.expectedVersion ?? null,
    action: "zone:edit",
    kind: "zone.rolled-back",
    templateOverrides: "skip",
    summary: (z) => `Rolled “${z.name}” back to revision ${revision.number}`,
    message: `Rolled back to revision ${revision.number}`,
    apply: async (innerTx, locked) => {
      const curves = new CurveResolver(innerTx, actor, { createdDescription: `Recreated when “${locked.name}” was rolled back to revision ${revision.number}.` });
      const applied = await applyZoneConfig(innerTx, { actor, zone: locked, config, curves, lockReason: `Locked by rolling back to revision ${revision.number}` });
      return [{ field: "Rolled back to revision", before: null, after: revision.number }, ...toAuditChanges(applied.diff)];
    },
  });
  return { id: result.revision.id, number: result.revision.number };
}

/**
 * Starts a push: the push, one target per zone that passes the preview, and one
 * job per target, in one transaction with its audit event. Refused, skipped and
 * unchanged zones are left out (and counted). Throws push:empty when nothing is
 * left to push, push:stale-preview when a zone changed since the preview.
 *
 * Scopes: { kind: "zone", zoneId } · { kind: "home", homeId } ·
 * { kind: "selection", zoneIds } · { kind: "template", templateId } ·
 * { kind: "rollback", zoneId, revisionId, restore?, expectedVersion? } ·
 * { kind: "household", homeId, zoneIds? } — the household's own change (e.g. a
 * station reorder), allowed to whoever may make that change (preset:reorder).
 */
export async function startPush({ actor, scope, expectedRevisions, note }: StartPushInput): Promise<StartPushResultDto> {
  assertMayPushScope(actor, scope);
  return withJobs(async (tx, jobs) => {
    const restoredRevision = scope.kind === "rollback" && scope.restore ? await restoreForRollback(tx, actor, scope) : null;
    // After a restore the zone's (new) current revision is what goes out.
    const effective: PushScope = restoredRevision && scope.kind === "rollback" ? { ...scope, revisionId: restoredRevision.id } : scope;
    const resolved = await resolveScope(tx, actor, effective, true);
    assertMayPushHome(actor, effective, resolved);

    if (expectedRevisions) {
      const moved = resolved.rows.filter((r) => expectedRevisions[r.zoneId] !== undefined && expectedRevisions[r.zoneId] !== r.revisionId);
      if (moved.length) {
        throw new AppError("push:stale-preview", {
          message: `${moved.map((r) => `“${r.zoneName}”`).join(", ")} changed since the preview. Look at the preview again before pushing.`,
          details: { zoneIds: moved.map((r) => r.zoneId) },
        });
      }
    }

    const extras = await loadExtras(tx, resolved.rows, !resolved.rows.every((r) => can(actor, "push:create", homeRef(r))));
    const list = resolved.rows.map((r) => previewZone(actor, effective.kind, r, extras));
    const counts = countOutcomes(list);
    const go = list.filter((z) => z.outcome === "push");
    if (go.length === 0) {
      const why = list.length === 0 ? "There are no zones in this scope." : [...new Set(list.flatMap((z) => z.reasons))].slice(0, 3).join(" ");
      throw new AppError("push:empty", { message: `Nothing to push. ${why}`.trim(), details: { counts } });
    }

    // Keys already used for these revision/device pairs decide the generation of the new ones.
    const rowsByZone = new Map(resolved.rows.map((r) => [r.zoneId, r] as const));
    const pairs = go.map((z) => ({ revisionId: z.revision!.id, deviceId: z.device!.id }));
    const used = new Map<string, string[]>();
    for (let i = 0; i < pairs.length; i += 2000) {
      const chunk = pairs.slice(i, i + 2000);
      const rows = await tx
        .select({ revisionId: pushTargets.revisionId, deviceId: pushTargets.deviceId, key: pushTargets.idempotencyKey })
        .from(pushTargets)
        .where(
          and(
            inArray(pushTargets.revisionId, chunk.map((p) => p.revisionId)),
            inArray(pushTargets.deviceId, chunk.map((p) => p.deviceId)),
          ),
        );
      for (const r of rows) {
        const k = `${r.revisionId}|${r.deviceId}`;
        used.set(k, [...(used.get(k) ?? []), r.key]);
      }
    }

    const [push] = await tx
      .insert(pushes)
      .values({ organizationId: actor.organizationId, createdBy: actor.userId, scopeKind: scope.kind, scopeLabel: resolved.label })
      .returning({ id: pushes.id });

    const values = go.map((z) => {
      const row = rowsByZone.get(z.zoneId)!;
      const generation = nextGeneration(used.get(`${row.revisionId}|${row.deviceId}`) ?? []);
      return {
        pushId: push.id,
        zoneId: z.zoneId,
        deviceId: row.deviceId!,
        revisionId: row.revisionId!,
        idempotencyKey: idempotencyKey(row.revisionId!, row.deviceId!, generation),
      };
    });
    const targetIds: string[] = [];
    for (let i = 0; i < values.length; i += 1000) {
      const inserted = await tx.insert(pushTargets).values(values.slice(i, i + 1000)).returning({ id: pushTargets.id });
      targetIds.push(...inserted.map((t) => t.id));
    }

    const homeIds = [...new Set(go.map((z) => z.homeId))];
    await recordAudit(tx, actor, {
      kind: "push.started",
      summary: `Started push “${resolved.label}” to ${go.length} zone${go.length === 1 ? "" : "s"}${note ? `: ${note}` : ""}`,
      homeId: homeIds.length === 1 ? homeIds[0] : null,
      zoneId: go.length === 1 ? go[0].zoneId : null,
      changes: [
        { field: "zones pushed", before: null, after: go.length },
        ...(counts.refused ? [{ field: "zones refused", before: null, after: counts.refused }] : []),
        ...(counts.skipped ? [{ field: "zones skipped (already under way)", before: null, after: counts.skipped }] : []),
        ...(counts.unchanged ? [{ field: "zones already in sync", before: null, after: counts.unchanged }] : []),
        ...(homeIds.length > 1 ? [{ field: "homes", before: null, after: homeIds.length }] : []),
        ...(scope.kind === "rollback" ? [{ field: "revision", before: null, after: go[0].revision!.number }] : []),
      ],
    });
    for (const targetId of targetIds) jobs.push({ queue: QUEUES.pushTarget, data: { targetId } });
    return { pushId: push.id, scopeLabel: resolved.label, targetCount: targetIds.length, counts, restoredRevision };
  });
}

// ── actions on a running or finished push ───────────────────────────────────

async function loadPushForAction(tx: Executor, actor: Actor, pushId: string) {
  const [push] = await tx
    .select({ id: pushes.id, organizationId: pushes.organizationId, scopeLabel: pushes.scopeLabel, status: pushes.status })
    .from(pushes)
    .where(and(eq(pushes.id, pushId), eq(pushes.organizationId, actor.organizationId)))
    .for("update");
  if (!push || !can(actor, "push:read")) throw new AppError("push:not-found");
  const homeRows = await tx
    .selectDistinct({ homeId: zones.homeId })
    .from(pushTargets)
    .innerJoin(zones, eq(zones.id, pushTargets.zoneId))
    .where(eq(pushTargets.pushId, pushId));
  const homeIds = homeRows.map((h) => h.homeId);
  const refused = homeIds.filter((id) => {
    const home = { id, organizationId: push.organizationId };
    return !can(actor, "push:create", home) && !can(actor, "push:repush", home);
  });
  if (refused.length) throw new AppError("auth:forbidden", { message: "Your role may not change this push (it reaches homes you may not push to)." });
  return { push, homeIds };
}

/** Failed targets of a push go back to queued and are sent again. */
export async function retryFailed({ actor, pushId }: { actor: Actor; pushId: string }) {
  return withJobs(async (tx, jobs) => {
    const { push, homeIds } = await loadPushForAction(tx, actor, pushId);
    const failed = await tx
      .select({
        id: pushTargets.id,
        revisionId: pushTargets.revisionId,
        deviceId: pushTargets.deviceId,
        key: pushTargets.idempotencyKey,
        desiredVersion: pushTargets.desiredVersion,
      })
      .from(pushTargets)
      .where(and(eq(pushTargets.pushId, pushId), eq(pushTargets.state, "failed")))
      .for("update");
    if (failed.length === 0) throw new AppError("push:nothing-to-retry");
    const used = await tx
      .select({ revisionId: pushTargets.revisionId, deviceId: pushTargets.deviceId, key: pushTargets.idempotencyKey })
      .from(pushTargets)
      .where(and(inArray(pushTargets.revisionId, [...new Set(failed.map((f) => f.revisionId))]), inArray(pushTargets.deviceId, [...new Set(failed.map((f) => f.deviceId))])));
    for (const target of failed) {
      // A target the fleet never accepted keeps its key (a lost answer may still be found);
      // one the device answered (refused, partial, no report) needs a new desired version.
      const key =
        target.desiredVersion === null
          ? target.key
          : idempotencyKey(
              target.revisionId,
              target.deviceId,
              nextGeneration(used.filter((u) => u.revisionId === target.revisionId && u.deviceId === target.deviceId).map((u) => u.key)),
            );
      used.push({ revisionId: target.revisionId, deviceId: target.deviceId, key });
      await tx
        .update(pushTargets)
        .set({ state: "queued", attempts: 0, lastError: null, desiredVersion: null, sentAt: null, appliedAt: null, idempotencyKey: key, updatedAt: sql`now()` })
        .where(and(eq(pushTargets.id, target.id), eq(pushTargets.state, "failed")));
      jobs.push({ queue: QUEUES.pushTarget, data: { targetId: target.id } });
    }
    await tx.update(pushes).set({ status: "running", finishedAt: null }).where(eq(pushes.id, pushId));
    await recordAudit(tx, actor, {
      kind: "push.retried",
      summary: `Retried ${failed.length} failed target${failed.length === 1 ? "" : "s"} of push “${push.scopeLabel}”`,
      homeId: homeIds.length === 1 ? homeIds[0] : null,
      changes: [{ field: "targets retried", before: null, after: failed.length }],
    });
    return { pushId, retried: failed.length };
  });
}

/** Targets not sent yet are cancelled; those already on their way run to their end. */
export async function cancelPending({ actor, pushId }: { actor: Actor; pushId: string }) {
  return withJobs(async (tx, jobs) => {
    const { push, homeIds } = await loadPushForAction(tx, actor, pushId);
    const cancelled = await tx
      .update(pushTargets)
      .set({ state: "cancelled", lastError: `Cancelled by ${actor.name} before it was sent.`, updatedAt: sql`now()` })
      .where(and(eq(pushTargets.pushId, pushId), eq(pushTargets.state, "queued")))
      .returning({ id: pushTargets.id });
    if (cancelled.length === 0) throw new AppError("push:nothing-to-cancel");
    await finishPushIfDone(tx, pushId, jobs);
    await recordAudit(tx, actor, {
      kind: "push.cancelled",
      summary: `Cancelled ${cancelled.length} pending target${cancelled.length === 1 ? "" : "s"} of push “${push.scopeLabel}”`,
      homeId: homeIds.length === 1 ? homeIds[0] : null,
      changes: [{ field: "targets cancelled", before: null, after: cancelled.length }],
    });
    return { pushId, cancelled: cancelled.length };
  });
}

// ── adopt reported ──────────────────────────────────────────────────────────

/** The device's reported configuration becomes the zone's desired one (a new revision). */
export async function adoptReported({ actor, zoneId, expectedVersion }: { actor: Actor; zoneId: string; expectedVersion: number }) {
  const zone = await loadZoneForActor({ actor, zoneId, action: "zone:edit" });
  if (!zone.deviceId) throw new AppError("device:no-report", { message: "No device is bound to this zone, so there is nothing reported to adopt." });
  const [device] = await db
    .select({ reportedConfig: devices.reportedConfig, serial: devices.serial, reportedVersion: devices.reportedVersion })
    .from(devices)
    .where(eq(devices.id, zone.deviceId));
  const reported = device?.reportedConfig ? normalizeConfig(device.reportedConfig) : null;
  if (!reported) throw new AppError("device:no-report");
  const result = await changeZone({
    actor,
    zoneId,
    expectedVersion,
    action: "zone:edit",
    kind: "zone.adopted-reported",
    summary: (z) => `Adopted what device ${device.serial} reports as the desired configuration of “${z.name}”`,
    message: `Adopted the configuration reported by device ${device.serial}`,
    apply: async (tx, locked) => {
      const curves = new CurveResolver(tx, actor, { createdDescription: `Recreated when the reported configuration of “${locked.name}” was adopted.` });
      const applied = await applyZoneConfig(tx, { actor, zone: locked, config: reported, curves, lockReason: "Locked at the device, adopted from its report" });
      if (applied.diff.identical) {
        throw new AppError("zone:rule", { message: "The device already reports the desired configuration; there is nothing to adopt." });
      }
      return toAuditChanges(applied.diff);
    },
  });
  return { zoneId, version: result.version, revision: result.revision, changes: result.changes };
}

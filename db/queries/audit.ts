import "server-only";
import type { Transaction } from "@/db/client";
import { auditEvents } from "@/db/schema";
import type { Actor } from "@/lib/permissions";
import { canonicalJson } from "@/lib/zones/content-hash";

export interface FieldChange {
  field: string;
  before: unknown;
  after: unknown;
}

/** Written inside the same transaction as the change it describes. */
export async function recordAudit(
  tx: Transaction,
  actor: Pick<Actor, "userId" | "name" | "role" | "organizationId">,
  event: { kind: string; summary: string; homeId?: string | null; zoneId?: string | null; changes?: FieldChange[] },
) {
  await tx.insert(auditEvents).values({
    organizationId: actor.organizationId,
    homeId: event.homeId ?? null,
    zoneId: event.zoneId ?? null,
    actorUserId: actor.userId,
    actorName: actor.name,
    actorRole: actor.role,
    kind: event.kind,
    summary: event.summary,
    changes: event.changes ?? [],
  });
}

/** Field-by-field differences between two flat records. */
export function diffFields<T extends Record<string, unknown>>(before: T, after: Partial<T>): FieldChange[] {
  const changes: FieldChange[] = [];
  for (const [field, value] of Object.entries(after)) {
    if (value === undefined) continue;
    // Canonical JSON: jsonb hands objects back with its own key order.
    if (canonicalJson(before[field]) !== canonicalJson(value)) changes.push({ field, before: before[field], after: value });
  }
  return changes;
}

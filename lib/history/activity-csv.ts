// The activity trail as CSV (RFC 4180), one row per audit event. Pure.

export interface ActivityCsvItem {
  createdAt: string;
  actorName: string;
  actorRole: string;
  homeName: string | null;
  zoneName: string | null;
  zoneDeleted: boolean;
  kind: string;
  summary: string;
  changes: { field: string; before: unknown; after: unknown }[];
}

// ── CSV ────────────────────────────────────────────────────────────────────

/**
 * One CSV field (RFC 4180: quoted when it holds a comma, quote or line break;
 * quotes doubled). A text that a spreadsheet would run as a formula gets a
 * leading apostrophe (common practice, no source: OWASP "CSV injection").
 */
export function csvField(value: unknown): string {
  let s = value === null || value === undefined ? "" : typeof value === "string" ? value : String(value);
  if (typeof value === "string" && /^[=+\-@\t\r]/.test(s)) s = `'${s}`;
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

const plain = (v: unknown) => (v === null || v === undefined ? "none" : typeof v === "string" ? v : JSON.stringify(v));

export const ACTIVITY_CSV_HEADER = ["Time (UTC)", "Person", "Role", "Home", "Zone", "Kind", "Summary", "Changes"];

export function activityCsvRow(item: ActivityCsvItem): string {
  const changes = item.changes.map((c) => `${c.field}: ${plain(c.before)} → ${plain(c.after)}`).join("; ");
  return [
    item.createdAt,
    item.actorName,
    item.actorRole,
    item.homeName ?? "",
    item.zoneName ? `${item.zoneName}${item.zoneDeleted ? " (deleted)" : ""}` : "",
    item.kind,
    item.summary,
    changes,
  ]
    .map(csvField)
    .join(",");
}

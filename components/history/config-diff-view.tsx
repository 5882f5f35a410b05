import { sectionLabels, type ConfigChange, type ConfigDiff, type DiffSection } from "@/lib/zones/config-diff";

// A ConfigDiff as people read it: one table per section (zone, guest controls,
// sources…), one row per change, before and after side by side with units.

const opLabels: Record<ConfigChange["op"], { text: string; className: string }> = {
  changed: { text: "changed", className: "bg-slate-100 text-slate-700" },
  added: { text: "added", className: "bg-accent-50 text-accent-700" },
  removed: { text: "removed", className: "bg-danger-50 text-danger-700" },
  reordered: { text: "moved", className: "bg-caution-50 text-caution-700" },
};

export function ConfigDiffView({
  diff,
  beforeLabel = "Before",
  afterLabel = "After",
  emptyText = "No differences: both configurations are the same.",
  testId = "config-diff",
}: {
  diff: ConfigDiff;
  beforeLabel?: string;
  afterLabel?: string;
  emptyText?: string;
  testId?: string;
}) {
  if (diff.identical) {
    return (
      <p data-testid={testId} className="rounded-md border border-dashed border-slate-300 px-4 py-6 text-center text-sm text-slate-600">
        {emptyText}
      </p>
    );
  }
  const bySection = new Map<DiffSection, ConfigChange[]>();
  for (const c of diff.changes) bySection.set(c.section, [...(bySection.get(c.section) ?? []), c]);
  return (
    <div data-testid={testId} className="space-y-4">
      <p className="text-sm text-slate-600" aria-live="polite">
        {diff.changes.length} difference{diff.changes.length === 1 ? "" : "s"}
        {diff.counts.added ? ` · ${diff.counts.added} added` : ""}
        {diff.counts.removed ? ` · ${diff.counts.removed} removed` : ""}
        {diff.counts.reordered ? ` · ${diff.counts.reordered} reordered` : ""}
      </p>
      {diff.sections.map((section) => (
        <section key={section} aria-labelledby={`diff-${testId}-${section}`} className="overflow-x-auto rounded-md border border-slate-200">
          <h3 id={`diff-${testId}-${section}`} className="border-b border-slate-200 bg-slate-50 px-3 py-1.5 text-xs font-semibold uppercase tracking-wide text-slate-600">
            {sectionLabels[section]}
          </h3>
          <table className="w-full min-w-[32rem] table-fixed text-left text-sm">
            <colgroup>
              <col className="w-[44%]" />
              <col className="w-[28%]" />
              <col className="w-[28%]" />
            </colgroup>
            <thead className="text-xs text-slate-500">
              <tr>
                <th scope="col" className="px-3 pt-1.5 font-medium">What</th>
                <th scope="col" className="px-3 pt-1.5 font-medium">{beforeLabel}</th>
                <th scope="col" className="px-3 pt-1.5 font-medium">{afterLabel}</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-slate-100">
              {bySection.get(section)!.map((c) => (
                <tr key={`${c.path}:${c.op}`} data-testid="diff-row" data-path={c.path} className="align-top">
                  <td className="break-words px-3 py-1.5">
                    <span className={`mr-2 inline-block rounded px-1.5 py-0.5 text-[11px] font-medium ${opLabels[c.op].className}`}>{opLabels[c.op].text}</span>
                    <span className="font-medium">{c.subject}</span>
                    {c.op === "changed" ? <span className="text-slate-600"> · {c.field}</span> : null}
                  </td>
                  <td className="break-words px-3 py-1.5 text-slate-600" data-testid="diff-before">{c.beforeText}</td>
                  <td className="break-words px-3 py-1.5 font-medium text-slate-900" data-testid="diff-after">
                    <span aria-hidden="true" className="mr-1 font-normal text-slate-400">→</span>
                    {c.afterText}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </section>
      ))}
    </div>
  );
}

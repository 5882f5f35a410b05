"use client";
import Link from "next/link";
import { useState } from "react";
import useSWR from "swr";
import type { ActivityFacetsDto, ActivityItemDto, ActivityListDto } from "@/db/queries/history";
import type { ApiError } from "@/lib/fetcher";
import { activityExportUrl, activityUrl, type ActivityQuery } from "@/lib/validation/history";
import { Badge, LocalTime, buttonClass, inputClass, labelClass } from "./ui";

// The audit trail as a filterable, paginated table (person, home, kind, days),
// with a CSV export of exactly what the filters select.

const roleLabels: Record<string, string> = { owner: "Owner", integrator: "Integrator", installer: "Installer", support: "Support", homeowner: "Homeowner" };

function kindFamilies(kinds: string[]): string[] {
  return [...new Set(kinds.filter((k) => k.includes(".")).map((k) => `${k.split(".")[0]}.`))].sort();
}

function formatValue(v: unknown): string {
  if (v === null || v === undefined) return "none";
  if (typeof v === "string") return v === "" ? "(empty)" : v;
  return JSON.stringify(v);
}

export function ActivityView({
  facets,
  initialQuery,
  fixedHomeId,
  zoneName,
}: {
  facets: ActivityFacetsDto;
  initialQuery: ActivityQuery;
  /** On a home's own activity page the home filter is fixed. */
  fixedHomeId?: string;
  /** The zone the page was opened for (filter shown as a removable chip). */
  zoneName?: string | null;
}) {
  const [query, setQuery] = useState<ActivityQuery>(initialQuery);
  const { data, error, isLoading, isValidating, mutate } = useSWR<ActivityListDto, ApiError>(activityUrl(query), { keepPreviousData: true });
  const pages = data ? Math.max(1, Math.ceil(data.total / data.pageSize)) : 1;
  const families = kindFamilies(facets.kinds);

  function set<K extends keyof ActivityQuery>(key: K, value: ActivityQuery[K]) {
    setQuery((q) => {
      const next = { ...q, [key]: value, page: 1 };
      // Days are the viewer's days: send their offset from UTC with them.
      if (key === "from" || key === "to") next.tz = new Date().getTimezoneOffset();
      return next;
    });
  }

  const filtered = Boolean(query.person || (!fixedHomeId && query.home) || query.kind || query.from || query.to || query.zone);

  return (
    <section className="mt-4 rounded-lg border border-slate-200 bg-white shadow-sm">
      <form
        className="grid gap-3 border-b border-slate-200 p-3 sm:grid-cols-2 lg:grid-cols-6"
        aria-label="Filter activity"
        onSubmit={(e) => e.preventDefault()}
      >
        <div>
          <label htmlFor="activity-person" className={labelClass}>Person</label>
          <select id="activity-person" className={inputClass} value={query.person ?? ""} onChange={(e) => set("person", e.target.value || undefined)}>
            <option value="">Everyone</option>
            {facets.people.map((p) => (
              <option key={p.id} value={p.id}>
                {p.name} ({roleLabels[p.role] ?? p.role})
              </option>
            ))}
          </select>
        </div>
        {fixedHomeId ? null : (
          <div>
            <label htmlFor="activity-home" className={labelClass}>Home</label>
            <select id="activity-home" className={inputClass} value={query.home ?? ""} onChange={(e) => set("home", e.target.value || undefined)}>
              <option value="">All homes</option>
              {facets.homes.map((h) => (
                <option key={h.id} value={h.id}>{h.name}</option>
              ))}
            </select>
          </div>
        )}
        <div>
          <label htmlFor="activity-kind" className={labelClass}>Kind</label>
          <select id="activity-kind" className={inputClass} value={query.kind ?? ""} onChange={(e) => set("kind", e.target.value || undefined)}>
            <option value="">Every kind</option>
            <optgroup label="Families">
              {families.map((f) => (
                <option key={f} value={f}>All {f.slice(0, -1)} changes</option>
              ))}
            </optgroup>
            <optgroup label="Kinds">
              {facets.kinds.map((k) => (
                <option key={k} value={k}>{k}</option>
              ))}
            </optgroup>
          </select>
        </div>
        <div>
          <label htmlFor="activity-from" className={labelClass}>From day</label>
          <input id="activity-from" type="date" className={inputClass} value={query.from ?? ""} max={query.to} onChange={(e) => set("from", e.target.value || undefined)} />
        </div>
        <div>
          <label htmlFor="activity-to" className={labelClass}>To day</label>
          <input id="activity-to" type="date" className={inputClass} value={query.to ?? ""} min={query.from} onChange={(e) => set("to", e.target.value || undefined)} />
        </div>
        <div className="flex items-end gap-2">
          <a href={activityExportUrl(query)} className={buttonClass} data-testid="activity-export" download>
            Export CSV
          </a>
          {filtered ? (
            <button
              type="button"
              className="text-sm text-accent-700 hover:underline"
              onClick={() => setQuery({ ...initialQuery, person: undefined, kind: undefined, from: undefined, to: undefined, zone: undefined, home: fixedHomeId, page: 1 })}
            >
              Clear
            </button>
          ) : null}
        </div>
      </form>
      {query.zone ? (
        <div className="border-b border-slate-200 px-3 py-2 text-sm">
          Zone: <Badge>{zoneName ?? "this zone"}</Badge>{" "}
          <button type="button" className="text-accent-700 hover:underline" onClick={() => set("zone", undefined)}>
            show the whole home
          </button>
        </div>
      ) : null}

      <div className="flex items-center justify-between px-3 py-2 text-sm text-slate-500" aria-live="polite">
        <span data-testid="activity-total">
          {data ? `${data.total} event${data.total === 1 ? "" : "s"}` : ""}
          {isValidating && !isLoading ? " · updating…" : ""}
        </span>
        <span>Times in your time zone</span>
      </div>

      {error ? (
        <div role="alert" data-testid="activity-error" className="flex items-center justify-between gap-3 bg-danger-50 p-4 text-sm text-danger-700">
          <span>Activity could not be loaded: {error.message}</span>
          <button onClick={() => mutate()} className="rounded-md bg-white px-3 py-1 ring-1 ring-danger-600/40">Retry</button>
        </div>
      ) : null}

      <div className="overflow-x-auto">
        <table className="w-full text-left text-sm" data-testid="activity-table">
          <thead className="bg-slate-50 text-xs uppercase tracking-wide text-slate-500">
            <tr>
              <th scope="col" className="px-3 py-2">When</th>
              <th scope="col" className="px-3 py-2">Who</th>
              <th scope="col" className="px-3 py-2">Where</th>
              <th scope="col" className="px-3 py-2">What</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-slate-100">
            {isLoading && !data ? (
              <tr><td colSpan={4} className="px-4 py-8 text-center text-slate-500" role="status">Loading activity…</td></tr>
            ) : data && data.items.length === 0 ? (
              <tr><td colSpan={4} className="px-4 py-10 text-center text-slate-500">{filtered ? "Nothing matches these filters." : "No activity yet."}</td></tr>
            ) : (
              data?.items.map((item) => <ActivityRow key={item.id} item={item} />)
            )}
          </tbody>
        </table>
      </div>

      <div className="flex items-center justify-between border-t border-slate-200 p-3 text-sm">
        <span className="text-slate-500">Page {query.page} of {pages}</span>
        <div className="flex gap-2">
          <button type="button" className={buttonClass} disabled={query.page <= 1} onClick={() => setQuery((q) => ({ ...q, page: q.page - 1 }))}>
            Previous
          </button>
          <button type="button" className={buttonClass} disabled={query.page >= pages} onClick={() => setQuery((q) => ({ ...q, page: q.page + 1 }))}>
            Next
          </button>
        </div>
      </div>
    </section>
  );
}

function ActivityRow({ item }: { item: ActivityItemDto }) {
  return (
    <tr data-testid="activity-row" className="align-top">
      <td className="whitespace-nowrap px-3 py-2 text-slate-600"><LocalTime iso={item.createdAt} /></td>
      <td className="px-3 py-2">
        <div className="font-medium">{item.actorName}</div>
        <div className="text-xs text-slate-500">{roleLabels[item.actorRole] ?? item.actorRole}</div>
      </td>
      <td className="px-3 py-2">
        {item.homeId && item.homeName ? (
          <Link href={`/homes/${item.homeId}/activity`} className="text-accent-700 hover:underline">{item.homeName}</Link>
        ) : (
          <span className="text-slate-500">Company</span>
        )}
        {item.zoneId && item.zoneName ? (
          <div className="text-xs">
            <Link href={`/zones/${item.zoneId}/history`} className="text-accent-700 hover:underline">{item.zoneName}</Link>
            {item.zoneDeleted ? <span className="ml-1 text-slate-500">(deleted)</span> : null}
          </div>
        ) : null}
      </td>
      <td className="px-3 py-2">
        <div>{item.summary}</div>
        <div className="font-mono text-[11px] text-slate-400">{item.kind}</div>
        {item.changes.length > 0 ? (
          <details className="mt-1">
            <summary className="cursor-pointer text-xs text-accent-700">
              {item.changes.length} field{item.changes.length === 1 ? "" : "s"} changed
            </summary>
            <ul className="mt-1 space-y-0.5 text-xs text-slate-700">
              {item.changes.map((c, i) => (
                <li key={`${c.field}-${i}`}>
                  <span className="font-medium">{c.field}</span>: <span className="text-slate-500">{formatValue(c.before)}</span> → {formatValue(c.after)}
                </li>
              ))}
            </ul>
          </details>
        ) : null}
      </td>
    </tr>
  );
}

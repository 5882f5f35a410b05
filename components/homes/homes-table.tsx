"use client";
import Link from "next/link";
import { useEffect, useState } from "react";
import useSWR from "swr";
import { DriftSummary } from "@/components/fleet/drift-summary";
import type { HomeListDto } from "@/db/queries/homes";
import type { ApiError } from "@/lib/fetcher";
import { homeListUrl, type HomeListQuery } from "@/lib/validation/homes";

const columns: { key: HomeListQuery["sort"]; label: string; numeric?: boolean }[] = [
  { key: "name", label: "Home" },
  { key: "household", label: "Household" },
  { key: "city", label: "City" },
  { key: "zones", label: "Zones", numeric: true },
  { key: "updated", label: "Last change" },
];

export function HomesTable({ initialQuery }: { initialQuery: HomeListQuery; canCreate: boolean }) {
  const [query, setQuery] = useState(initialQuery);
  const [searchText, setSearchText] = useState(initialQuery.search);

  // Debounce typing so each keystroke is not a request.
  useEffect(() => {
    const t = setTimeout(() => setQuery((q) => (q.search === searchText ? q : { ...q, search: searchText, page: 1 })), 250);
    return () => clearTimeout(t);
  }, [searchText]);

  const { data, error, isLoading, isValidating, mutate } = useSWR<HomeListDto, ApiError>(homeListUrl(query), {
    keepPreviousData: true,
  });
  const pages = data ? Math.max(1, Math.ceil(data.total / data.pageSize)) : 1;

  function sortBy(key: HomeListQuery["sort"]) {
    setQuery((q) => ({ ...q, sort: key, dir: q.sort === key && q.dir === "asc" ? "desc" : "asc", page: 1 }));
  }

  return (
    <section className="mt-4 rounded-lg border border-slate-200 bg-white shadow-sm">
      <div className="flex flex-wrap items-center gap-3 border-b border-slate-200 p-3">
        <label htmlFor="home-search" className="sr-only">Search homes</label>
        <input
          id="home-search"
          type="search"
          value={searchText}
          onChange={(e) => setSearchText(e.target.value)}
          placeholder="Search by home, household or city"
          className="w-72 max-w-full rounded-md border border-slate-300 px-3 py-1.5 text-sm"
        />
        <span className="text-sm text-slate-500" aria-live="polite">
          {data ? `${data.total} home${data.total === 1 ? "" : "s"}` : ""}
          {isValidating && !isLoading ? " · updating…" : ""}
        </span>
      </div>

      {error ? (
        <div role="alert" data-testid="homes-error" className="flex items-center justify-between gap-3 bg-danger-50 p-4 text-sm text-danger-700">
          <span>Homes could not be loaded: {error.message}</span>
          <button onClick={() => mutate()} className="rounded-md bg-white px-3 py-1 ring-1 ring-danger-600/40">Retry</button>
        </div>
      ) : null}

      <div className="overflow-x-auto">
        <table className="w-full text-left text-sm" data-testid="homes-table">
          <thead className="bg-slate-50 text-xs uppercase tracking-wide text-slate-500">
            <tr>
              {columns.map((c) => (
                <th
                  key={c.key}
                  scope="col"
                  className={`px-4 py-2 ${c.numeric ? "text-right" : ""}`}
                  aria-sort={query.sort === c.key ? (query.dir === "asc" ? "ascending" : "descending") : "none"}
                >
                  <button type="button" onClick={() => sortBy(c.key)} className="inline-flex items-center gap-1 font-semibold hover:text-slate-900">
                    {c.label}
                    <span aria-hidden="true">{query.sort === c.key ? (query.dir === "asc" ? "▲" : "▼") : ""}</span>
                  </button>
                </th>
              ))}
              <th scope="col" className="px-4 py-2">Devices</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-slate-100">
            {isLoading && !data ? (
              <tr><td colSpan={6} className="px-4 py-8 text-center text-slate-500" role="status">Loading homes…</td></tr>
            ) : data && data.items.length === 0 ? (
              <tr>
                <td colSpan={6} className="px-4 py-10 text-center text-slate-500">
                  {query.search ? `No home matches “${query.search}”.` : "No homes yet."}
                </td>
              </tr>
            ) : (
              data?.items.map((home) => (
                <tr key={home.id} className="hover:bg-slate-50">
                  <td className="px-4 py-2 font-medium">
                    <Link href={`/homes/${home.id}`} className="text-accent-700 hover:underline">{home.name}</Link>
                  </td>
                  <td className="px-4 py-2">{home.householdName}</td>
                  <td className="px-4 py-2">{home.city}</td>
                  <td className="px-4 py-2 text-right tabular-nums">
                    {home.zoneCount}
                    {home.offlineDevices > 0 ? (
                      <span className="ml-2 rounded bg-caution-50 px-1.5 py-0.5 text-xs text-caution-700">{home.offlineDevices} offline</span>
                    ) : null}
                  </td>
                  <td className="px-4 py-2 text-slate-600">
                    <time dateTime={home.updatedAt}>{new Date(home.updatedAt).toLocaleDateString("en-GB", { day: "numeric", month: "short", year: "numeric" })}</time>
                  </td>
                  <td className="px-4 py-2"><DriftSummary counts={home.drift} /></td>
                </tr>
              ))
            )}
          </tbody>
        </table>
      </div>

      <div className="flex items-center justify-between border-t border-slate-200 p-3 text-sm">
        <span className="text-slate-500">Page {query.page} of {pages}</span>
        <div className="flex gap-2">
          <button
            type="button"
            disabled={query.page <= 1}
            onClick={() => setQuery((q) => ({ ...q, page: q.page - 1 }))}
            className="rounded-md px-3 py-1 ring-1 ring-slate-300 disabled:opacity-40"
          >
            Previous
          </button>
          <button
            type="button"
            disabled={query.page >= pages}
            onClick={() => setQuery((q) => ({ ...q, page: q.page + 1 }))}
            className="rounded-md px-3 py-1 ring-1 ring-slate-300 disabled:opacity-40"
          >
            Next
          </button>
        </div>
      </div>
    </section>
  );
}

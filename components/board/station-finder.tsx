"use client";
import { useId, useState, type SyntheticEvent } from "react";
import useSWR from "swr";
import type { SearchStationsResponse, Station } from "@/lib/stations/api-schema";
import { fetcher, type ApiError } from "@/lib/fetcher";
import { stationSearchSchema } from "@/lib/validation/board";
import { inputClass, labelClass } from "./dialog-shell";

/** Find a station by name or genre in the station directory; choosing one fills the preset form. */
export function StationFinder({ onChoose }: { onChoose: (station: Station) => void }) {
  const uid = useId();
  const [name, setName] = useState("");
  const [genre, setGenre] = useState("");
  const [searchKey, setSearchKey] = useState<string | null>(null);
  const [hint, setHint] = useState<string | null>(null);
  const { data, error, isLoading, mutate } = useSWR<SearchStationsResponse, ApiError>(searchKey, fetcher, {
    shouldRetryOnError: false,
    revalidateOnFocus: false,
    revalidateIfStale: false,
  });

  function search(event: SyntheticEvent) {
    event.preventDefault();
    event.stopPropagation();
    const parsed = stationSearchSchema.safeParse({ q: name, genre });
    if (!parsed.success) {
      setHint(parsed.error.issues[0]?.message ?? "Type part of a station name or a genre.");
      return;
    }
    setHint(null);
    const params = new URLSearchParams();
    if (parsed.data.q) params.set("q", parsed.data.q);
    if (parsed.data.genre) params.set("genre", parsed.data.genre);
    const key = `/api/stations?${params}`;
    if (key === searchKey) void mutate();
    else setSearchKey(key);
  }

  return (
    <section className="rounded-md border border-slate-200 bg-slate-50 p-3" aria-labelledby={`${uid}-title`} data-testid="station-finder">
      <h3 id={`${uid}-title`} className="text-sm font-semibold">Find a station in the directory</h3>
      {/* A nested <form> is not allowed inside the preset form, so this is a group with its own submit. */}
      <div
        role="search"
        className="mt-2 grid gap-2 sm:grid-cols-[1fr_10rem_auto]"
        onKeyDown={(e) => {
          if (e.key === "Enter" && e.target instanceof HTMLInputElement) search(e);
        }}
      >
        <div>
          <label htmlFor={`${uid}-name`} className={labelClass}>Name</label>
          <input id={`${uid}-name`} className={inputClass} value={name} onChange={(e) => setName(e.target.value)} placeholder="e.g. lantern" />
        </div>
        <div>
          <label htmlFor={`${uid}-genre`} className={labelClass}>Genre</label>
          <input id={`${uid}-genre`} className={inputClass} value={genre} onChange={(e) => setGenre(e.target.value)} placeholder="e.g. jazz" />
        </div>
        <button type="button" onClick={search} className="self-end rounded-md bg-white px-3 py-1.5 text-sm ring-1 ring-slate-300 hover:bg-slate-100">
          Search
        </button>
      </div>
      {hint ? <p className="mt-2 text-xs text-danger-700" role="alert">{hint}</p> : null}
      <div aria-live="polite" className="mt-2 text-sm">
        {isLoading ? <p className="text-slate-500">Searching the station directory…</p> : null}
        {error ? (
          <p role="alert" data-testid="station-error" className="rounded border border-danger-600/30 bg-danger-50 px-2 py-1 text-danger-700">
            {error.message} Nothing was added.
          </p>
        ) : null}
        {data && !isLoading && !error ? (
          data.stations.length === 0 ? (
            <p className="text-slate-500">No station matches. Try fewer words or another genre.</p>
          ) : (
            <>
              <p className="text-xs text-slate-500">
                {data.total > data.stations.length ? `First ${data.stations.length} of ${data.total} matches.` : `${data.total} match${data.total === 1 ? "" : "es"}.`}
              </p>
              <ul className="mt-1 max-h-48 divide-y divide-slate-200 overflow-y-auto rounded border border-slate-200 bg-white" data-testid="station-results">
                {data.stations.map((s) => (
                  <li key={s.id} className="flex items-center justify-between gap-2 px-2 py-1.5">
                    <span>
                      <span className="font-medium">{s.name}</span>
                      <span className="ml-2 text-xs text-slate-500">
                        {s.genre} · {s.bitrateKbps} kbit/s {s.codec.toUpperCase()} · {s.country}
                      </span>
                    </span>
                    <button type="button" onClick={() => onChoose(s)} className="rounded px-2 py-0.5 text-sm text-accent-700 ring-1 ring-accent-500/50 hover:bg-accent-50" aria-label={`Choose ${s.name}`}>
                      Choose
                    </button>
                  </li>
                ))}
              </ul>
            </>
          )
        ) : null}
      </div>
    </section>
  );
}

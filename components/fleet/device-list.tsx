"use client";
import Link from "next/link";
import { useEffect, useMemo, useState } from "react";
import useSWR from "swr";
import type { DeviceRowDto } from "@/db/queries/devices";
import { ApiError, sendJson } from "@/lib/fetcher";
import { deviceListUrl } from "@/lib/validation/pushes";
import { MaintenanceWindowFields, defaultWindow, windowToIso, type WindowValue } from "./maintenance-window-fields";

// Every device of the company with its firmware; choose several and schedule
// their firmware updates in one maintenance window.

interface ScheduleResult {
  scheduled: { serial: string; version: string }[];
  refused: { serial: string; reason: string }[];
}

export function DeviceList({ canCare }: { canCare: boolean }) {
  const [searchText, setSearchText] = useState("");
  const [search, setSearch] = useState("");
  const [outdated, setOutdated] = useState(false);
  const [selected, setSelected] = useState<Set<string>>(new Set());
  const [slot, setSlot] = useState<WindowValue | null>(null);
  const [busy, setBusy] = useState(false);
  const [message, setMessage] = useState<{ kind: "ok" | "error"; text: string } | null>(null);
  useEffect(() => setSlot(defaultWindow()), []);
  useEffect(() => {
    const t = setTimeout(() => setSearch(searchText.trim()), 250);
    return () => clearTimeout(t);
  }, [searchText]);

  const { data, error, mutate, isLoading } = useSWR<{ items: DeviceRowDto[] }, ApiError>(deviceListUrl(search, outdated), { keepPreviousData: true });
  const items = useMemo(() => data?.items ?? [], [data]);
  const selectable = items.filter((d) => d.outdated && !d.pendingFirmware);

  function toggle(id: string) {
    setSelected((s) => {
      const next = new Set(s);
      if (next.has(id)) next.delete(id);
      else next.add(id);
      return next;
    });
  }

  async function schedule(e: React.FormEvent) {
    e.preventDefault();
    if (!slot || selected.size === 0) return;
    setBusy(true);
    setMessage(null);
    try {
      const result = await sendJson<ScheduleResult>("/api/devices/firmware", "POST", { deviceIds: [...selected], ...windowToIso(slot) });
      setMessage({
        kind: "ok",
        text: `Scheduled ${result.scheduled.length} update${result.scheduled.length === 1 ? "" : "s"}.${
          result.refused.length ? ` Not scheduled: ${result.refused.map((r) => `${r.serial} (${r.reason})`).join("; ")}` : ""
        }`,
      });
      setSelected(new Set());
      await mutate();
    } catch (err) {
      const fields = err instanceof ApiError ? Object.values(err.fieldErrors ?? {}).flat() : [];
      setMessage({ kind: "error", text: [err instanceof Error ? err.message : String(err), ...fields].join(" ") });
    } finally {
      setBusy(false);
    }
  }

  return (
    <div>
      <div className="mt-4 flex flex-wrap items-center gap-3">
        <label htmlFor="device-search" className="sr-only">
          Search devices
        </label>
        <input
          id="device-search"
          type="search"
          value={searchText}
          onChange={(e) => setSearchText(e.target.value)}
          placeholder="Serial, fleet id, home or zone"
          className="w-72 max-w-full rounded-md border border-slate-300 px-3 py-1.5 text-sm"
        />
        <label className="flex items-center gap-1 text-sm">
          <input type="checkbox" checked={outdated} onChange={(e) => setOutdated(e.target.checked)} /> Only devices with newer firmware available
        </label>
      </div>
      {error ? (
        <p role="alert" className="mt-3 text-sm text-danger-700">
          Devices could not be loaded: {error.message}
        </p>
      ) : null}
      {canCare ? (
        <form onSubmit={schedule} className="mt-4 flex flex-wrap items-end gap-3 rounded-lg border border-slate-200 bg-white p-3 shadow-sm" aria-label="Schedule firmware updates">
          <p className="w-full text-sm">
            <span className="font-medium">Firmware update for {selected.size} selected device{selected.size === 1 ? "" : "s"}</span>{" "}
            <span className="text-slate-500">— each gets the newest firmware the fleet offers it; the devices restart inside the window.</span>
          </p>
          {slot ? <MaintenanceWindowFields value={slot} onChange={setSlot} /> : null}
          <button type="button" onClick={() => setSelected(new Set(selectable.map((d) => d.id)))} className="rounded-md px-3 py-1.5 text-sm ring-1 ring-slate-300" disabled={selectable.length === 0}>
            Select all {selectable.length} outdated
          </button>
          <button type="submit" disabled={busy || selected.size === 0} className="rounded-md bg-accent-600 px-3 py-1.5 text-sm font-medium text-white hover:bg-accent-700 disabled:opacity-50">
            {busy ? "Scheduling…" : "Schedule updates"}
          </button>
          {message ? (
            <p role={message.kind === "error" ? "alert" : "status"} className={`w-full text-sm ${message.kind === "error" ? "text-danger-700" : "text-accent-700"}`}>
              {message.text}
            </p>
          ) : null}
        </form>
      ) : null}
      <div className="mt-4 overflow-x-auto rounded-lg border border-slate-200 bg-white shadow-sm">
        <table className="w-full text-left text-sm" data-testid="devices-table">
          <thead className="bg-slate-50 text-xs uppercase tracking-wide text-slate-500">
            <tr>
              {canCare ? (
                <th scope="col" className="px-3 py-2">
                  <span className="sr-only">Select</span>
                </th>
              ) : null}
              <th scope="col" className="px-3 py-2">Device</th>
              <th scope="col" className="px-3 py-2">Model</th>
              <th scope="col" className="px-3 py-2">Where</th>
              <th scope="col" className="px-3 py-2">Firmware</th>
              <th scope="col" className="px-3 py-2">Connection</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-slate-100">
            {isLoading && !data ? (
              <tr>
                <td colSpan={6} className="px-3 py-6 text-center text-slate-500" role="status">
                  Loading devices…
                </td>
              </tr>
            ) : items.length === 0 ? (
              <tr>
                <td colSpan={6} className="px-3 py-8 text-center text-slate-500">
                  No device matches.
                </td>
              </tr>
            ) : (
              items.map((d) => (
                <tr key={d.id}>
                  {canCare ? (
                    <td className="px-3 py-2">
                      <input
                        type="checkbox"
                        aria-label={`Select ${d.serial}`}
                        checked={selected.has(d.id)}
                        disabled={!d.outdated || d.pendingFirmware !== null}
                        onChange={() => toggle(d.id)}
                      />
                    </td>
                  ) : null}
                  <td className="px-3 py-2">
                    <Link href={`/devices/${d.id}`} className="font-medium text-accent-700 hover:underline">
                      {d.serial}
                    </Link>
                  </td>
                  <td className="px-3 py-2">{d.modelName}</td>
                  <td className="px-3 py-2">{d.homeName ? `${d.homeName}${d.zoneName ? ` · ${d.zoneName}` : ""}` : <span className="text-slate-500">not in a home</span>}</td>
                  <td className="px-3 py-2 tabular-nums">
                    {d.firmwareVersion}
                    {d.outdated ? <span className="ml-2 text-xs text-caution-700">{d.latestFirmware} available</span> : null}
                    {d.pendingFirmware ? (
                      <span className="block text-xs text-slate-500">
                        {d.pendingFirmware.version} scheduled {new Date(d.pendingFirmware.windowStart).toLocaleString("en-GB", { dateStyle: "short", timeStyle: "short" })}
                      </span>
                    ) : null}
                  </td>
                  <td className="px-3 py-2">{d.online ? "Online" : <span className="text-danger-700">Offline</span>}</td>
                </tr>
              ))
            )}
          </tbody>
        </table>
      </div>
    </div>
  );
}

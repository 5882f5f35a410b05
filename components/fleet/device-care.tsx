"use client";
import Link from "next/link";
import { useEffect, useState } from "react";
import useSWR from "swr";
import type { DeviceDetailDto } from "@/db/queries/devices";
import type { FirmwareOffer } from "@/lib/fleet/firmware-service";
import { ApiError, sendJson } from "@/lib/fetcher";
import { deviceUrl } from "@/lib/validation/pushes";
import { sourceKindLabels, type SourceKind } from "@/lib/devices/model-profiles";
import { PushZoneButton } from "@/components/pushes/push-zone-button";
import { DriftBadge } from "./drift-badge";
import { TargetStateBadge } from "./status-badges";
import { MaintenanceWindowFields, windowToIso, defaultWindow } from "./maintenance-window-fields";

// The device page for support: model profile, firmware and what the fleet
// offers, drift, last reports and errors, firmware updates in a maintenance
// window, and the log bundle (fetched through the fleet API).

export type DeviceView = DeviceDetailDto & { firmwareOffer: FirmwareOffer };

function when(iso: string | null) {
  return iso ? new Date(iso).toLocaleString("en-GB", { dateStyle: "medium", timeStyle: "short" }) : "—";
}

export function DeviceCare({ deviceId }: { deviceId: string }) {
  const [busy, setBusy] = useState(false);
  const { data, error, mutate } = useSWR<DeviceView, ApiError>(deviceUrl(deviceId), {
    refreshInterval: busy ? 3000 : 15_000,
    onSuccess: (d) => setBusy(d.firmwareUpdates.some((u) => ["queued", "sending", "awaiting_report"].includes(u.state)) || d.drift?.state === "pending"),
  });
  if (error && !data) {
    return (
      <p role="alert" className="rounded-lg bg-danger-50 p-4 text-sm text-danger-700">
        The device could not be loaded: {error.message}
      </p>
    );
  }
  if (!data) return <p role="status">Loading the device…</p>;
  const d = data;
  // One rollback offer per earlier revision the device applied (on its newest push).
  const rollbackOffers = new Set<number>();
  const offered = new Set<string>();
  d.recentTargets.forEach((t, i) => {
    if (!d.zone || !d.canRollback || t.state !== "applied" || t.revisionId === d.zone.currentRevisionId || offered.has(t.revisionId)) return;
    offered.add(t.revisionId);
    rollbackOffers.add(i);
  });
  return (
    <div>
      <nav className="text-sm text-slate-500">
        <Link href="/devices" className="hover:underline">
          Devices
        </Link>{" "}
        / {d.serial}
      </nav>
      <div className="mt-1 flex flex-wrap items-center gap-3">
        <h1 className="text-2xl font-semibold">{d.serial}</h1>
        <span className={`rounded-full px-2 py-0.5 text-xs font-medium ring-1 ring-inset ${d.online ? "bg-accent-50 text-accent-700 ring-accent-600/30" : "bg-danger-50 text-danger-700 ring-danger-600/30"}`}>
          {d.online ? "Online" : "Offline"}
        </span>
        {d.zone ? <DriftBadge zoneId={d.zone.id} initial={d.drift ?? undefined} onChanged={() => void mutate()} /> : null}
      </div>
      <p className="text-sm text-slate-600">
        {d.model.name} · fleet id <span data-testid="fleet-device-id">{d.fleetDeviceId}</span>
        {d.home ? (
          <>
            {" "}
            ·{" "}
            <Link href={`/homes/${d.home.id}`} className="text-accent-700 hover:underline">
              {d.home.name}
            </Link>
          </>
        ) : (
          " · not in a home"
        )}
        {d.zone ? ` · ${d.zone.name}` : ""}
        {" · last report "}
        {when(d.lastReportAt)}
      </p>

      <div className="mt-6 grid gap-4 lg:grid-cols-3">
        <section className="rounded-lg border border-slate-200 bg-white p-4 shadow-sm" aria-labelledby="model-title">
          <h2 id="model-title" className="font-semibold">
            Model profile
          </h2>
          <dl className="mt-2 grid grid-cols-2 gap-x-3 gap-y-1 text-sm">
            <dt className="text-slate-500">Preset slots</dt>
            <dd className="tabular-nums">{d.model.presetSlots}</dd>
            <dt className="text-slate-500">EQ bands</dt>
            <dd className="tabular-nums">{d.model.eqBands}</dd>
            <dt className="text-slate-500">Subwoofer outputs</dt>
            <dd className="tabular-nums">{d.model.subwooferOutputs}</dd>
            <dt className="text-slate-500">Line out</dt>
            <dd>{d.model.hasLineOut ? "yes" : "no"}</dd>
            <dt className="text-slate-500">Inputs</dt>
            <dd>{d.model.inputs.map((k) => sourceKindLabels[k as SourceKind] ?? k).join(", ")}</dd>
          </dl>
        </section>
        <FirmwareSection device={d} onChanged={() => void mutate()} />
        <LogsSection device={d} />
      </div>

      <section className="mt-6 rounded-lg border border-slate-200 bg-white shadow-sm" aria-labelledby="errors-title">
        <h2 id="errors-title" className="border-b border-slate-200 px-4 py-3 font-semibold">
          Errors
        </h2>
        {d.errors.length === 0 ? (
          <p className="px-4 py-4 text-sm text-slate-500">No errors reported.</p>
        ) : (
          <ul className="divide-y divide-slate-100 text-sm">
            {d.errors.map((e, i) => (
              <li key={i} className="px-4 py-2">
                <span className="text-slate-500">{when(e.at)} · {e.source}</span> <span className="text-danger-700">{e.text}</span>{" "}
                {e.pushId ? (
                  <Link href={`/pushes/${e.pushId}`} className="text-accent-700 hover:underline">
                    push
                  </Link>
                ) : null}
              </li>
            ))}
          </ul>
        )}
      </section>

      <section className="mt-6 rounded-lg border border-slate-200 bg-white shadow-sm" aria-labelledby="reports-title">
        <h2 id="reports-title" className="border-b border-slate-200 px-4 py-3 font-semibold">
          Last reports
        </h2>
        <div className="overflow-x-auto">
          <table className="w-full text-left text-sm" data-testid="reports-table">
            <thead className="bg-slate-50 text-xs uppercase tracking-wide text-slate-500">
              <tr>
                <th scope="col" className="px-4 py-2">When</th>
                <th scope="col" className="px-4 py-2">Event</th>
                <th scope="col" className="px-4 py-2 text-right">Sequence</th>
                <th scope="col" className="px-4 py-2">Status</th>
                <th scope="col" className="px-4 py-2 text-right">Desired / reported version</th>
                <th scope="col" className="px-4 py-2">Firmware</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-slate-100">
              {d.reports.length === 0 ? (
                <tr>
                  <td colSpan={6} className="px-4 py-6 text-center text-slate-500">
                    The device has not reported anything yet.
                  </td>
                </tr>
              ) : (
                d.reports.map((r) => (
                  <tr key={r.eventId}>
                    <td className="px-4 py-2 text-slate-600">{when(r.occurredAt)}</td>
                    <td className="px-4 py-2">
                      {r.kind}
                      {r.origin === "local" ? <span className="ml-1 text-caution-700">(changed at the device)</span> : null}
                    </td>
                    <td className="px-4 py-2 text-right tabular-nums">{r.sequence}</td>
                    <td className="px-4 py-2">
                      {r.status ?? "—"}
                      {r.error ? <span className="ml-1 text-danger-700">{r.error}</span> : null}
                    </td>
                    <td className="px-4 py-2 text-right tabular-nums">
                      {r.desiredVersion} / {r.reportedVersion}
                    </td>
                    <td className="px-4 py-2">{r.firmwareVersion}</td>
                  </tr>
                ))
              )}
            </tbody>
          </table>
        </div>
      </section>

      <section className="mt-6 rounded-lg border border-slate-200 bg-white shadow-sm" aria-labelledby="pushes-title">
        <h2 id="pushes-title" className="border-b border-slate-200 px-4 py-3 font-semibold">
          Recent pushes to this device
        </h2>
        {d.recentTargets.length === 0 ? (
          <p className="px-4 py-4 text-sm text-slate-500">Nothing pushed to this device yet.</p>
        ) : (
          <ul className="divide-y divide-slate-100 text-sm">
            {d.recentTargets.map((t, i) => (
              <li key={i} className="flex flex-wrap items-center gap-3 px-4 py-2">
                <TargetStateBadge state={t.state} label={t.stateLabel} />
                <Link href={`/pushes/${t.pushId}`} className="text-accent-700 hover:underline">
                  {t.scopeLabel}
                </Link>
                <span className="text-slate-500">revision {t.revisionNumber} · {when(t.updatedAt)}</span>
                {t.lastError ? <span className="text-danger-700">{t.lastError}</span> : null}
                {d.zone && rollbackOffers.has(i) ? (
                  <span className="ml-auto flex gap-2">
                    <PushZoneButton
                      scope={{ kind: "rollback", zoneId: d.zone.id, revisionId: t.revisionId }}
                      label={`Push revision ${t.revisionNumber} again`}
                      className="rounded-md px-2 py-1 text-xs ring-1 ring-slate-300 hover:bg-slate-50"
                    />
                    {d.canRestore ? (
                      <PushZoneButton
                        scope={{ kind: "rollback", zoneId: d.zone.id, revisionId: t.revisionId, restore: true, expectedVersion: d.zone.version }}
                        label={`Roll back to revision ${t.revisionNumber}`}
                        className="rounded-md bg-accent-600 px-2 py-1 text-xs font-medium text-white hover:bg-accent-700"
                      />
                    ) : null}
                  </span>
                ) : null}
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}

function FirmwareSection({ device, onChanged }: { device: DeviceView; onChanged: () => void }) {
  const offer = device.firmwareOffer;
  // Set after mount: the default depends on the browser's clock and time zone, not the server's.
  const [slot, setSlot] = useState<ReturnType<typeof defaultWindow> | null>(null);
  useEffect(() => setSlot(defaultWindow()), []);
  const [busy, setBusy] = useState(false);
  const [message, setMessage] = useState<{ kind: "ok" | "error"; text: string } | null>(null);
  const pending = device.firmwareUpdates.find((u) => ["queued", "sending", "awaiting_report"].includes(u.state));

  async function schedule(e: React.FormEvent) {
    e.preventDefault();
    if (!offer.available || !slot) return;
    setBusy(true);
    setMessage(null);
    try {
      await sendJson(`/api/devices/${device.id}/firmware`, "POST", { version: offer.available, ...windowToIso(slot) });
      setMessage({ kind: "ok", text: `Firmware ${offer.available} scheduled. The household sees the maintenance window.` });
      onChanged();
    } catch (err) {
      const fieldErrors = err instanceof ApiError ? Object.values(err.fieldErrors ?? {}).flat() : [];
      setMessage({ kind: "error", text: [err instanceof Error ? err.message : String(err), ...fieldErrors].join(" ") });
    } finally {
      setBusy(false);
    }
  }

  return (
    <section className="rounded-lg border border-slate-200 bg-white p-4 shadow-sm" aria-labelledby="firmware-title">
      <h2 id="firmware-title" className="font-semibold">
        Firmware
      </h2>
      <p className="mt-2 text-sm">
        Running <span className="font-medium tabular-nums" data-testid="firmware-current">{device.firmwareVersion}</span>
        {offer.available ? (
          <>
            {" "}
            · <span className="text-caution-700">{offer.available} offered by the fleet</span>
          </>
        ) : (
          " · up to date"
        )}
      </p>
      {offer.note ? <p className="mt-1 text-xs text-slate-500">{offer.note}</p> : null}
      {pending ? (
        <p className="mt-2 text-sm">
          <TargetStateBadge state={pending.state} label={pending.stateLabel} /> {pending.targetVersion} between {when(pending.windowStart)} and {when(pending.windowEnd)}
        </p>
      ) : null}
      {device.canCare && offer.available && !pending ? (
        <form onSubmit={schedule} className="mt-3 space-y-2" aria-label="Schedule a firmware update">
          {slot ? <MaintenanceWindowFields value={slot} onChange={setSlot} /> : null}
          <p className="text-xs text-slate-500">The device restarts while it installs; its zone is silent for a few minutes inside the window.</p>
          <button type="submit" disabled={busy} className="rounded-md bg-accent-600 px-3 py-1.5 text-sm font-medium text-white hover:bg-accent-700 disabled:opacity-50">
            {busy ? "Scheduling…" : `Schedule ${offer.available}`}
          </button>
        </form>
      ) : null}
      {message ? (
        <p role={message.kind === "error" ? "alert" : "status"} className={`mt-2 text-sm ${message.kind === "error" ? "text-danger-700" : "text-accent-700"}`}>
          {message.text}
        </p>
      ) : null}
      {device.firmwareUpdates.length ? (
        <ul className="mt-3 space-y-1 text-xs text-slate-600" aria-label="Firmware updates">
          {device.firmwareUpdates.map((u) => (
            <li key={u.id}>
              <TargetStateBadge state={u.state} label={u.stateLabel} /> {u.targetVersion} · window {when(u.windowStart)} – {when(u.windowEnd)}
              {u.createdBy ? ` · by ${u.createdBy}` : ""}
              {u.lastError ? <span className="block text-danger-700">{u.lastError}</span> : null}
            </li>
          ))}
        </ul>
      ) : null}
    </section>
  );
}

function LogsSection({ device }: { device: DeviceView }) {
  const [state, setState] = useState<{ kind: "idle" | "busy" | "ok" | "error"; text?: string }>({ kind: "idle" });
  async function download() {
    setState({ kind: "busy" });
    try {
      const response = await fetch(`/api/devices/${device.id}/logs`);
      if (!response.ok) {
        const body = (await response.json().catch(() => null)) as { error?: { message?: string } } | null;
        throw new Error(body?.error?.message ?? `The server answered ${response.status}.`);
      }
      const blob = await response.blob();
      const name = /filename="([^"]+)"/.exec(response.headers.get("content-disposition") ?? "")?.[1] ?? `${device.serial}-logs.txt`;
      const url = URL.createObjectURL(blob);
      const a = document.createElement("a");
      a.href = url;
      a.download = name;
      a.click();
      URL.revokeObjectURL(url);
      setState({ kind: "ok", text: `Saved ${name} (${Math.ceil(blob.size / 1024)} KB).` });
    } catch (e) {
      setState({ kind: "error", text: e instanceof Error ? e.message : String(e) });
    }
  }
  return (
    <section className="rounded-lg border border-slate-200 bg-white p-4 shadow-sm" aria-labelledby="logs-title">
      <h2 id="logs-title" className="font-semibold">
        Log bundle
      </h2>
      <p className="mt-2 text-sm text-slate-600">The device’s own log, fetched through the fleet. Fetching it is recorded in the activity trail.</p>
      {device.canCare ? (
        <button
          type="button"
          onClick={download}
          disabled={state.kind === "busy"}
          className="mt-3 rounded-md px-3 py-1.5 text-sm ring-1 ring-slate-300 hover:bg-slate-50 disabled:opacity-50"
          data-testid="download-logs"
        >
          {state.kind === "busy" ? "Fetching…" : "Download log bundle"}
        </button>
      ) : (
        <p className="mt-2 text-sm text-slate-500">Support, integrators and the owner may fetch it.</p>
      )}
      {state.text ? (
        <p role={state.kind === "error" ? "alert" : "status"} className={`mt-2 text-sm ${state.kind === "error" ? "text-danger-700" : "text-accent-700"}`}>
          {state.text}
        </p>
      ) : null}
    </section>
  );
}

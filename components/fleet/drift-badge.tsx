"use client";
import * as Dialog from "@radix-ui/react-dialog";
import Link from "next/link";
import { useRouter } from "next/navigation";
import { useState } from "react";
import useSWR from "swr";
import type { ZoneDriftDto } from "@/db/queries/devices";
import { ApiError, sendJson } from "@/lib/fetcher";
import { zoneDriftUrl } from "@/lib/validation/pushes";
import { DriftStateBadge } from "./status-badges";

// The board's drift indicator for one zone: a badge (in sync / pending /
// drifted / offline / never reported) that opens the field-by-field difference
// between desired and reported, with "Push again" and "Adopt reported".
//
//   <DriftBadge zoneId={zone.id} />                 fetches /api/zones/:id/drift
//   <DriftBadge zoneId={zone.id} initial={dto} />   seeded (e.g. from /api/fleet/drift?homeId=…)

export function DriftBadge({ zoneId, initial, onChanged }: { zoneId: string; initial?: ZoneDriftDto; onChanged?: () => void }) {
  const [open, setOpen] = useState(false);
  // While something is on its way, look again every few seconds (a number, so SWR re-arms on change).
  const [pending, setPending] = useState(initial?.state === "pending");
  const { data, error, mutate } = useSWR<ZoneDriftDto, ApiError>(zoneDriftUrl(zoneId), {
    fallbackData: initial,
    refreshInterval: pending ? 2000 : 15_000,
    onSuccess: (d) => setPending(d.state === "pending"),
  });
  if (error && !data) return <span className="text-xs text-danger-700" role="status">Drift unknown: {error.message}</span>;
  if (!data) return <span className="text-xs text-slate-500" role="status">Checking device…</span>;
  return (
    <Dialog.Root open={open} onOpenChange={setOpen}>
      <Dialog.Trigger asChild>
        <button
          type="button"
          className="rounded-full focus:outline-none focus-visible:ring-2 focus-visible:ring-accent-600"
          aria-label={`${data.zoneName}: ${data.label}. ${data.explanation} Show details.`}
          data-testid="drift-badge"
        >
          <DriftStateBadge state={data.state} />
        </button>
      </Dialog.Trigger>
      <DriftDialogContent
        drift={data}
        onChanged={async () => {
          await mutate();
          onChanged?.();
        }}
      />
    </Dialog.Root>
  );
}

export function DriftDialogContent({ drift, onChanged }: { drift: ZoneDriftDto; onChanged: () => Promise<void> | void }) {
  const router = useRouter();
  const [busy, setBusy] = useState<"push" | "adopt" | null>(null);
  const [message, setMessage] = useState<{ kind: "ok" | "error"; text: string; pushId?: string } | null>(null);

  async function pushAgain() {
    setBusy("push");
    setMessage(null);
    try {
      const started = await sendJson<{ pushId: string }>("/api/pushes", "POST", {
        scope: { kind: "zone", zoneId: drift.zoneId },
        ...(drift.desiredRevision ? { expectedRevisions: { [drift.zoneId]: drift.desiredRevision.id } } : {}),
      });
      setMessage({ kind: "ok", text: "Push started.", pushId: started.pushId });
      await onChanged();
    } catch (error) {
      setMessage({ kind: "error", text: error instanceof Error ? error.message : String(error) });
    } finally {
      setBusy(null);
    }
  }

  async function adopt() {
    setBusy("adopt");
    setMessage(null);
    try {
      await sendJson(`/api/zones/${drift.zoneId}/adopt-reported`, "POST", { expectedVersion: drift.zoneVersion });
      setMessage({ kind: "ok", text: "The reported configuration is now the desired one (a new revision)." });
      await onChanged();
      router.refresh();
    } catch (error) {
      setMessage({ kind: "error", text: error instanceof Error ? error.message : String(error) });
    } finally {
      setBusy(null);
    }
  }

  return (
    <Dialog.Portal>
      <Dialog.Overlay className="fixed inset-0 z-40 bg-slate-900/40" />
      <Dialog.Content
        className="fixed left-1/2 top-1/2 z-50 max-h-[85vh] w-[min(42rem,calc(100vw-2rem))] -translate-x-1/2 -translate-y-1/2 overflow-y-auto rounded-lg bg-white p-5 shadow-xl"
        data-testid="drift-dialog"
      >
        <Dialog.Title className="text-lg font-semibold">
          {drift.zoneName}: <DriftStateBadge state={drift.state} />
        </Dialog.Title>
        <Dialog.Description className="mt-1 text-sm text-slate-600">{drift.explanation}</Dialog.Description>
        {drift.device ? (
          <p className="mt-2 text-xs text-slate-500">
            Device{" "}
            <Link href={`/devices/${drift.device.id}`} className="text-accent-700 hover:underline">
              {drift.device.serial}
            </Link>{" "}
            · desired version {drift.device.desiredVersion}, reported {drift.device.reportedVersion}
            {drift.device.lastReportAt ? ` · last report ${new Date(drift.device.lastReportAt).toLocaleString("en-GB")}` : ""}
            {drift.desiredRevision ? ` · desired: revision ${drift.desiredRevision.number}` : ""}
          </p>
        ) : null}
        {drift.activePush ? (
          <p className="mt-2 text-sm">
            A push is under way ({drift.activePush.state}).{" "}
            <Link href={`/pushes/${drift.activePush.pushId}`} className="text-accent-700 hover:underline">
              Follow it
            </Link>
          </p>
        ) : null}
        {drift.changes.length > 0 ? (
          <div className="mt-4 overflow-x-auto">
            <table className="w-full text-left text-sm" data-testid="drift-changes">
              <caption className="sr-only">Desired configuration compared with what the device reports</caption>
              <thead className="bg-slate-50 text-xs uppercase tracking-wide text-slate-500">
                <tr>
                  <th scope="col" className="px-3 py-2">What</th>
                  <th scope="col" className="px-3 py-2">Desired</th>
                  <th scope="col" className="px-3 py-2">Device reports</th>
                </tr>
              </thead>
              <tbody className="divide-y divide-slate-100">
                {drift.changes.map((c) => (
                  <tr key={`${c.path}-${c.op}`}>
                    <th scope="row" className="px-3 py-1.5 font-normal">
                      {c.subject} · {c.field}
                    </th>
                    <td className="px-3 py-1.5 tabular-nums">{c.desired}</td>
                    <td className="px-3 py-1.5 tabular-nums text-caution-700">{c.reported}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        ) : null}
        {drift.device?.reportedError ? <p className="mt-3 text-sm text-danger-700">Device says: {drift.device.reportedError}</p> : null}
        {message ? (
          <p role={message.kind === "error" ? "alert" : "status"} className={`mt-3 text-sm ${message.kind === "error" ? "text-danger-700" : "text-accent-700"}`}>
            {message.text}{" "}
            {message.pushId ? (
              <Link href={`/pushes/${message.pushId}`} className="underline">
                See the push
              </Link>
            ) : null}
          </p>
        ) : null}
        <div className="mt-5 flex flex-wrap justify-end gap-2">
          {drift.canAdopt ? (
            <button
              type="button"
              onClick={adopt}
              disabled={busy !== null}
              className="rounded-md px-3 py-1.5 text-sm ring-1 ring-slate-300 hover:bg-slate-50 disabled:opacity-50"
              title="Make what the device reports the zone's desired configuration (a new revision)"
            >
              {busy === "adopt" ? "Adopting…" : "Adopt reported"}
            </button>
          ) : null}
          {drift.canPushAgain ? (
            <button
              type="button"
              onClick={pushAgain}
              disabled={busy !== null}
              className="rounded-md bg-accent-600 px-3 py-1.5 text-sm font-medium text-white hover:bg-accent-700 disabled:opacity-50"
            >
              {busy === "push" ? "Starting…" : "Push again"}
            </button>
          ) : null}
          <Dialog.Close className="rounded-md px-3 py-1.5 text-sm ring-1 ring-slate-300 hover:bg-slate-50">Close</Dialog.Close>
        </div>
      </Dialog.Content>
    </Dialog.Portal>
  );
}

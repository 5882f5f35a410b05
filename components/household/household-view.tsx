"use client";
import { useState } from "react";
import useSWR from "swr";
import type { HouseholdReorderResult, HouseholdViewDto, HouseholdZoneDto } from "@/db/queries/household";
import { useHydrated } from "@/components/ui/use-hydrated";
import { ApiError, sendJson } from "@/lib/fetcher";
import { StationOrder, type Station } from "./station-order";

export const householdKey = "/api/household";

type SaveState =
  | { kind: "idle" }
  | { kind: "saving"; text: string }
  | { kind: "saved"; text: string; undo: Station[] | null }
  | { kind: "error"; text: string };

function Allowed({ yes, children }: { yes: boolean; children: React.ReactNode }) {
  return (
    <li className="flex items-start gap-2">
      <span aria-hidden="true" className={`mt-0.5 inline-flex h-5 w-5 shrink-0 items-center justify-center rounded-full text-xs font-bold ${yes ? "bg-accent-100 text-accent-700" : "bg-slate-200 text-slate-600"}`}>
        {yes ? "✓" : "✕"}
      </span>
      <span>
        {children}: <span className="font-medium">{yes ? "yes" : "no"}</span>
      </span>
    </li>
  );
}

function ZoneCard({
  zone,
  headingLevel,
  onChange,
  onBusy,
}: {
  zone: HouseholdZoneDto;
  headingLevel: 2 | 3;
  onChange: (next: HouseholdZoneDto | null) => Promise<void>;
  onBusy: (delta: 1 | -1) => void;
}) {
  const [save, setSave] = useState<SaveState>({ kind: "idle" });
  const Heading = headingLevel === 2 ? "h2" : "h3";
  const Sub = headingLevel === 2 ? "h3" : "h4";
  const busy = save.kind === "saving";

  async function sendOrder(next: Station[], previous: Station[], describe: string, offerUndo: boolean) {
    setSave({ kind: "saving", text: `Saving: ${describe}…` });
    onBusy(1);
    // Show the new order at once; put the old one back if the server refuses.
    await onChange({ ...zone, presets: next });
    try {
      const result = await sendJson<HouseholdReorderResult>(`/api/household/zones/${zone.id}/presets/order`, "PUT", {
        version: zone.version,
        presetIds: next.map((s) => s.id),
      });
      await onChange(result.zone);
      const text = result.push.outcome === "unchanged" ? `${describe}: the order was already like this.` : `${describe}. Saved.`;
      setSave({ kind: "saved", text, undo: offerUndo && result.revision.created ? previous : null });
    } catch (error) {
      await onChange({ ...zone, presets: previous });
      if (error instanceof ApiError && error.status === 409) {
        setSave({ kind: "error", text: "Someone else changed this room a moment ago. The latest order is shown now; please try again." });
        await onChange(null);
      } else {
        setSave({ kind: "error", text: `The new order was not saved: ${error instanceof Error ? error.message : "please try again."}` });
      }
    } finally {
      onBusy(-1);
    }
  }

  const locked = zone.guestControls.locked;

  return (
    <article className="rounded-xl border border-slate-200 bg-white p-4 shadow-sm sm:p-5" data-testid="zone-card" aria-labelledby={`zone-${zone.id}`}>
      <Heading id={`zone-${zone.id}`} className="text-lg font-semibold">{zone.name}</Heading>

      <dl className="mt-3 space-y-1 text-sm">
        <div className="flex flex-wrap justify-between gap-x-3">
          <dt className="text-slate-600">Never louder than</dt>
          <dd className="font-medium tabular-nums">{zone.volumeCeiling} % of full volume</dd>
        </div>
        <div className="flex flex-wrap justify-between gap-x-3">
          <dt className="text-slate-600">Starts at</dt>
          <dd className="font-medium tabular-nums">{zone.turnOnVolume} % when switched on</dd>
        </div>
      </dl>

      <Sub className="mt-4 text-sm font-semibold">What you can play here</Sub>
      {zone.sources.length === 0 ? <p className="text-sm text-slate-600">Nothing is connected yet.</p> : null}
      <ul className="mt-1 flex flex-wrap gap-2 text-sm" aria-label={`Sources in ${zone.name}`}>
        {zone.sources.map((s) => (
          <li key={s.id} className="rounded-full bg-slate-100 px-3 py-1">
            {s.label} <span className="text-slate-600">· {s.kind}</span>
          </li>
        ))}
      </ul>

      <Sub className="mt-4 text-sm font-semibold">Phones and apps on your home network may</Sub>
      <ul className="mt-1 space-y-1 text-sm">
        <Allowed yes={zone.guestControls.volume}>Change the volume</Allowed>
        <Allowed yes={zone.guestControls.source}>Switch what is playing</Allowed>
        <Allowed yes={zone.guestControls.wake}>Switch the room on</Allowed>
      </ul>
      {locked ? (
        <p className="mt-2 rounded-md bg-caution-50 px-3 py-2 text-sm text-caution-700" role="note">
          Your integrator’s support team has locked these settings for now, so the station order cannot change either. Ask them if you need something changed.
        </p>
      ) : null}

      <Sub className="mt-4 text-sm font-semibold">Favourite stations</Sub>
      {zone.presets.length === 0 ? (
        <p className="text-sm text-slate-600">No favourite stations yet. Your integrator can add them.</p>
      ) : (
        <>
          {!locked && zone.presets.length > 1 ? (
            <p className="mb-2 text-xs text-slate-600">Drag a station by its handle to change the order, or focus the handle and use Space and the arrow keys.</p>
          ) : null}
          <StationOrder
            zoneId={zone.id}
            zoneName={zone.name}
            stations={zone.presets}
            disabled={locked || busy || zone.presets.length < 2}
            onReorder={(next, moved, to) => sendOrder(next, zone.presets, `${moved.name} moved to number ${to + 1}`, true)}
          />
        </>
      )}

      <div className="mt-3 space-y-1 text-sm" data-testid="zone-status">
        <div aria-live="polite">
          {save.kind === "saving" ? <p className="text-slate-600">{save.text}</p> : null}
          {save.kind === "saved" ? (
            <p className="text-accent-700" data-testid="save-result">
              {save.text}{" "}
              {save.undo ? (
                <button type="button" className="ml-1 font-medium underline"
                  onClick={() => sendOrder(save.undo!, zone.presets, "Previous order put back", false)}>
                  Undo
                </button>
              ) : null}
            </p>
          ) : null}
        </div>
        {save.kind === "error" ? <p role="alert" className="text-danger-700" data-testid="save-error">{save.text}</p> : null}
        <p role="status" className={zone.delivery.state === "failed" ? "text-caution-700" : "text-slate-600"} data-testid="delivery" data-state={zone.delivery.state}>
          {zone.delivery.state === "sending" ? <span aria-hidden="true" className="mr-1 inline-block h-2 w-2 animate-pulse rounded-full bg-accent-500" /> : null}
          {zone.delivery.text}
        </p>
      </div>
    </article>
  );
}

/** The household's own home(s): read-only in plain words, except the order of their stations. */
export function HouseholdView() {
  const hydrated = useHydrated();
  const [busy, setBusy] = useState(0);
  // While a push is on its way, follow it; never while a save is in flight (it would undo the optimistic order).
  const { data, error, mutate } = useSWR<HouseholdViewDto, ApiError>(householdKey, {
    refreshInterval: (latest) =>
      busy === 0 && latest?.homes.some((h) => h.zones.some((z) => z.delivery.state === "sending")) ? 3000 : 0,
  });
  if (error && !data) {
    return (
      <div role="alert" className="rounded-lg bg-danger-50 p-4 text-sm text-danger-700">
        Your home could not be loaded: {error.message}{" "}
        <button type="button" className="font-medium underline" onClick={() => mutate()}>Try again</button>
      </div>
    );
  }
  if (!data) return <p role="status">Loading your home…</p>;
  if (data.homes.length === 0) {
    return (
      <div className="rounded-lg border border-dashed border-slate-300 bg-white px-6 py-10 text-center">
        <h1 className="font-medium">No home is linked to your account yet.</h1>
        <p className="mt-1 text-sm text-slate-600">Your integrator ({data.company}) can invite you to your home.</p>
      </div>
    );
  }

  /** Replace one zone in the cached view (null: fetch the latest from the server). */
  const replaceZone = async (next: HouseholdZoneDto | null) => {
    if (!next) {
      await mutate();
      return;
    }
    await mutate(
      (current) =>
        current && {
          ...current,
          homes: current.homes.map((h) => ({ ...h, zones: h.zones.map((z) => (z.id === next.id ? next : z)) })),
        },
      { revalidate: false },
    );
  };

  const several = data.homes.length > 1;
  return (
    <div className="space-y-10" data-hydrated={hydrated} data-testid="household-view">
      {several ? <h1 className="text-2xl font-semibold">Your homes</h1> : null}
      {data.homes.map((home) => {
        const HomeHeading = several ? "h2" : "h1";
        return (
          <section key={home.id} aria-labelledby={`home-${home.id}`} className="space-y-4" data-testid="household-home">
            <div>
              <HomeHeading id={`home-${home.id}`} className="text-2xl font-semibold">{home.name}</HomeHeading>
              <p className="text-sm text-slate-600">
                How the music and TV sound is set up in each room, looked after by {data.company}. You can put each room’s favourite stations in the order you like.
              </p>
            </div>
            {home.zones.length === 0 ? <p className="text-sm text-slate-600">No rooms are set up yet.</p> : null}
            <div className="grid gap-4 md:grid-cols-2">
              {home.zones.map((zone) => (
                <ZoneCard key={zone.id} zone={zone} headingLevel={several ? 3 : 2} onChange={replaceZone} onBusy={(d) => setBusy((b) => b + d)} />
              ))}
            </div>
          </section>
        );
      })}
    </div>
  );
}

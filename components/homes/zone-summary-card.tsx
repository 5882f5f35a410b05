import type { ZoneSummaryDto } from "@/db/queries/overview";
import { sourceKindLabels, type SourceKind } from "@/lib/devices/model-profiles";

function allowed(flag: boolean) {
  return flag ? "allowed" : "not allowed";
}

/** A zone in plain words: what it plays, how loud it may go, what guests may do. */
export function ZoneSummaryCard({ zone, showDevice }: { zone: ZoneSummaryDto; showDevice: boolean }) {
  return (
    <article className="rounded-lg border border-slate-200 bg-white p-4 shadow-sm" data-testid="zone-card">
      <header className="flex items-start justify-between gap-2">
        <h3 className="font-semibold">{zone.name}</h3>
        {showDevice && zone.device ? (
          <span className={`rounded px-1.5 py-0.5 text-xs ${zone.device.online ? "bg-accent-50 text-accent-700" : "bg-caution-50 text-caution-700"}`}>
            {zone.device.online ? "online" : "offline"}
          </span>
        ) : null}
      </header>
      {showDevice && zone.device ? <p className="text-xs text-slate-500">{zone.device.modelName} · {zone.device.serial}</p> : null}
      <dl className="mt-3 grid grid-cols-2 gap-x-3 gap-y-1 text-sm">
        <dt className="text-slate-500">Volume ceiling</dt>
        <dd className="tabular-nums">{zone.volumeCeiling} %</dd>
        <dt className="text-slate-500">Turn-on volume</dt>
        <dd className="tabular-nums">{zone.turnOnVolume} %</dd>
      </dl>
      <h4 className="mt-3 text-xs font-semibold uppercase tracking-wide text-slate-500">Sources</h4>
      <ul className="mt-1 text-sm">
        {zone.sources.length === 0 ? <li className="text-slate-500">None</li> : null}
        {zone.sources.map((s) => (
          <li key={s.id}>
            {s.label} <span className="text-slate-500">({sourceKindLabels[s.kind as SourceKind] ?? s.kind})</span>
          </li>
        ))}
      </ul>
      <h4 className="mt-3 text-xs font-semibold uppercase tracking-wide text-slate-500">Favourite stations</h4>
      <ol className="mt-1 list-decimal pl-5 text-sm">
        {zone.presets.length === 0 ? <li className="list-none text-slate-500">None yet</li> : null}
        {zone.presets.map((p) => (
          <li key={p.id}>{p.name}</li>
        ))}
      </ol>
      <h4 className="mt-3 text-xs font-semibold uppercase tracking-wide text-slate-500">Phones and apps on the home network</h4>
      <ul className="mt-1 text-sm text-slate-700">
        <li>Changing the volume: {allowed(zone.guestControls.volume)}</li>
        <li>Switching the source: {allowed(zone.guestControls.source)}</li>
        <li>Waking the zone: {allowed(zone.guestControls.wake)}</li>
        {zone.guestControls.locked ? <li className="text-caution-700">Locked by your integrator’s support team</li> : null}
      </ul>
    </article>
  );
}

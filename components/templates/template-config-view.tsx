import { sourceKindLabels } from "@/lib/devices/model-profiles";
import type { ZoneConfig } from "@/lib/validation/zone-config";
import { formatCurve, formatDb, formatHz } from "@/lib/zones/config-diff";

const allowed = (v: boolean) => (v ? "allowed" : "not allowed");
const roleNames = { main_left: "Main left", main_right: "Main right", subwoofer: "Subwoofer", line_out: "Line out" } as const;

/** A template's configuration, read-only, with units. */
export function TemplateConfigView({ config }: { config: ZoneConfig }) {
  const x = config.outputLayout.crossover;
  return (
    <div className="grid gap-4 lg:grid-cols-2" data-testid="template-config">
      <section className="rounded-lg border border-slate-200 bg-white p-4">
        <h3 className="font-semibold">Levels and guests</h3>
        <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
          <dt className="text-slate-500">Volume ceiling</dt>
          <dd className="tabular-nums">{config.volumeCeiling} %</dd>
          <dt className="text-slate-500">Turn-on volume</dt>
          <dd className="tabular-nums">{config.turnOnVolume} %</dd>
          <dt className="text-slate-500">Guests change volume</dt>
          <dd>{allowed(config.guestControls.volume)}</dd>
          <dt className="text-slate-500">Guests switch source</dt>
          <dd>{allowed(config.guestControls.source)}</dd>
          <dt className="text-slate-500">Guests wake the zone</dt>
          <dd>{allowed(config.guestControls.wake)}</dd>
          <dt className="text-slate-500">Zone tone curve</dt>
          <dd>{formatCurve(config.zoneCurve)}</dd>
          <dt className="text-slate-500">Standby after</dt>
          <dd className="tabular-nums">{config.deviceSettings.standbyMinutes} min</dd>
          <dt className="text-slate-500">HDMI CEC</dt>
          <dd>
            power {config.deviceSettings.cecPower ? "on" : "off"}, volume {config.deviceSettings.cecVolume ? "on" : "off"}
          </dd>
        </dl>
      </section>

      <section className="rounded-lg border border-slate-200 bg-white p-4">
        <h3 className="font-semibold">Output layout</h3>
        <p className="mt-2 text-sm">
          Crossover: {x ? `${x.type === "linkwitz_riley" ? "Linkwitz-Riley" : "Butterworth"} ${x.slopeDbPerOctave} dB/octave at ${formatHz(x.frequencyHz)}` : "none"}
        </p>
        {config.outputLayout.outputs.length ? (
          <table className="mt-2 w-full text-left text-sm">
            <caption className="sr-only">Outputs</caption>
            <thead className="text-xs uppercase tracking-wide text-slate-500">
              <tr><th scope="col">Output</th><th scope="col">Distance</th><th scope="col">Latency</th><th scope="col">Trim</th></tr>
            </thead>
            <tbody>
              {config.outputLayout.outputs.map((o) => (
                <tr key={o.id}>
                  <td>{o.label} <span className="text-slate-500">({roleNames[o.role]})</span></td>
                  <td className="tabular-nums">{o.distance.value} {o.distance.unit}</td>
                  <td className="tabular-nums">{o.latencyMs} ms</td>
                  <td className="tabular-nums">{formatDb(o.trimDb)}{o.polarityInverted ? ", inverted" : ""}</td>
                </tr>
              ))}
            </tbody>
          </table>
        ) : (
          <p className="mt-1 text-sm text-slate-500">Stereo pair, no outputs set.</p>
        )}
      </section>

      <section className="rounded-lg border border-slate-200 bg-white p-4">
        <h3 className="font-semibold">Sources</h3>
        <table className="mt-2 w-full text-left text-sm">
          <caption className="sr-only">Sources</caption>
          <thead className="text-xs uppercase tracking-wide text-slate-500">
            <tr><th scope="col">Name</th><th scope="col">Input</th><th scope="col" className="text-right">Offset</th><th scope="col">Tone curve</th></tr>
          </thead>
          <tbody>
            {config.sources.map((s) => (
              <tr key={s.key} className={s.enabled ? "" : "text-slate-400"}>
                <td>{s.label}{s.enabled ? "" : " (hidden)"}</td>
                <td>{sourceKindLabels[s.kind]}{s.subsonic ? ", subsonic filter" : ""}</td>
                <td className="text-right tabular-nums">{formatDb(s.loudnessOffsetDb)}</td>
                <td>{s.toneCurve?.name ?? "—"}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </section>

      <section className="rounded-lg border border-slate-200 bg-white p-4">
        <h3 className="font-semibold">Favourite stations</h3>
        {config.presets.length === 0 ? <p className="mt-1 text-sm text-slate-500">None.</p> : null}
        <ol className="mt-2 list-decimal space-y-0.5 pl-5 text-sm">
          {config.presets.map((p) => (
            <li key={p.key}>
              {p.name} <span className="text-slate-500">{p.genre ? `· ${p.genre}` : ""} · {formatDb(p.loudnessOffsetDb)}{p.toneCurve ? ` · ${p.toneCurve.name}` : ""}</span>
            </li>
          ))}
        </ol>
      </section>
    </div>
  );
}

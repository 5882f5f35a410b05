import type { MaintenanceWindowDto } from "@/db/queries/devices";

// For the household view: firmware maintenance windows of their home, in plain
// words ("The Patio amplifier may restart between …"). Pure: give it the rows of
// listMaintenanceWindows({ actor, homeId }) (db/queries/devices.ts).

function when(iso: string) {
  return new Date(iso).toLocaleString("en-GB", { weekday: "short", day: "numeric", month: "short", hour: "2-digit", minute: "2-digit" });
}

export function MaintenanceNotice({ windows }: { windows: MaintenanceWindowDto[] }) {
  if (windows.length === 0) return null;
  return (
    <section className="rounded-lg border border-caution-500/40 bg-caution-50 p-4" aria-labelledby="maintenance-title" data-testid="maintenance-notice">
      <h2 id="maintenance-title" className="font-semibold text-caution-700">
        Planned maintenance
      </h2>
      <ul className="mt-2 space-y-1 text-sm text-slate-800">
        {windows.map((w) => (
          <li key={`${w.deviceId}-${w.windowStart}`}>
            {w.state === "scheduled" ? (
              <>
                The {w.zoneName ?? "audio"} amplifier gets a software update between {when(w.windowStart)} and {when(w.windowEnd)}. It may restart and be
                silent for a few minutes in that time.
              </>
            ) : w.state === "installed" ? (
              <>The {w.zoneName ?? "audio"} amplifier was updated (software {w.targetVersion}).</>
            ) : (
              <>The planned update of the {w.zoneName ?? "audio"} amplifier did not happen; your installer will arrange a new time.</>
            )}
          </li>
        ))}
      </ul>
    </section>
  );
}

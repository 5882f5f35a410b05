"use client";

// Start and end of a maintenance window, entered in the browser's local time
// (datetime-local) and sent as ISO 8601 with the offset made explicit.

export interface WindowValue {
  start: string;
  end: string;
}

function localInput(date: Date): string {
  const pad = (n: number) => String(n).padStart(2, "0");
  return `${date.getFullYear()}-${pad(date.getMonth() + 1)}-${pad(date.getDate())}T${pad(date.getHours())}:${pad(date.getMinutes())}`;
}

/** Tonight 02:00–04:00 local time, a quiet time in most homes (common practice, no source). */
export function defaultWindow(): WindowValue {
  const start = new Date();
  start.setDate(start.getDate() + (start.getHours() >= 2 ? 1 : 0));
  start.setHours(2, 0, 0, 0);
  const end = new Date(start.getTime() + 2 * 3600_000);
  return { start: localInput(start), end: localInput(end) };
}

export function windowToIso(w: WindowValue): { windowStart: string; windowEnd: string } {
  return { windowStart: new Date(w.start).toISOString(), windowEnd: new Date(w.end).toISOString() };
}

export function MaintenanceWindowFields({ value, onChange }: { value: WindowValue; onChange: (v: WindowValue) => void }) {
  return (
    <div className="flex flex-wrap gap-3 text-sm">
      <label>
        <span className="block text-slate-600">Window starts</span>
        <input type="datetime-local" required value={value.start} onChange={(e) => onChange({ ...value, start: e.target.value })} className="rounded-md border border-slate-300 px-2 py-1" />
      </label>
      <label>
        <span className="block text-slate-600">Window ends</span>
        <input type="datetime-local" required value={value.end} onChange={(e) => onChange({ ...value, end: e.target.value })} className="rounded-md border border-slate-300 px-2 py-1" />
      </label>
    </div>
  );
}

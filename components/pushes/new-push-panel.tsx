"use client";
import { useMemo, useState } from "react";
import type { PushScope } from "@/lib/validation/pushes";
import { PushZoneButton } from "./push-zone-button";

// Start a push from the pushes page: a whole home, every zone made from a zone
// template, or zones chosen across homes. Single zones and rollbacks also start
// from a zone's drift badge and the device page.

export interface PushScopeOptions {
  homes: { id: string; name: string; zoneCount: number }[];
  templates: { id: string; name: string; zoneCount: number }[];
  zones: { id: string; name: string; homeName: string }[];
}

export function NewPushPanel({ options }: { options: PushScopeOptions }) {
  const [kind, setKind] = useState<"home" | "template" | "selection">("home");
  const [homeId, setHomeId] = useState(options.homes[0]?.id ?? "");
  const [templateId, setTemplateId] = useState(options.templates[0]?.id ?? "");
  const [chosen, setChosen] = useState<Set<string>>(new Set());
  const [filter, setFilter] = useState("");
  const shown = useMemo(() => {
    const f = filter.trim().toLowerCase();
    return options.zones.filter((z) => !f || z.name.toLowerCase().includes(f) || z.homeName.toLowerCase().includes(f)).slice(0, 200);
  }, [filter, options.zones]);
  const scope: PushScope | null =
    kind === "home"
      ? homeId
        ? { kind: "home", homeId }
        : null
      : kind === "template"
        ? templateId
          ? { kind: "template", templateId }
          : null
        : chosen.size
          ? { kind: "selection", zoneIds: [...chosen] }
          : null;
  return (
    <section className="mt-4 rounded-lg border border-slate-200 bg-white p-4 shadow-sm" aria-labelledby="new-push-title">
      <h2 id="new-push-title" className="font-semibold">
        Start a push
      </h2>
      <p className="text-sm text-slate-600">You see what will change, zone by zone, before anything is sent.</p>
      <div className="mt-3 flex flex-wrap items-end gap-3">
        <fieldset className="flex gap-3 text-sm">
          <legend className="sr-only">What to push</legend>
          <label className="flex items-center gap-1">
            <input type="radio" name="push-kind" checked={kind === "home"} onChange={() => setKind("home")} /> A home
          </label>
          <label className="flex items-center gap-1">
            <input type="radio" name="push-kind" checked={kind === "template"} onChange={() => setKind("template")} disabled={options.templates.length === 0} /> Zones
            made from a template
          </label>
          <label className="flex items-center gap-1">
            <input type="radio" name="push-kind" checked={kind === "selection"} onChange={() => setKind("selection")} disabled={options.zones.length === 0} /> Chosen
            zones
          </label>
        </fieldset>
        {kind === "home" ? (
          <label className="text-sm">
            <span className="sr-only">Home</span>
            <select value={homeId} onChange={(e) => setHomeId(e.target.value)} className="rounded-md border border-slate-300 px-2 py-1.5" data-testid="push-home-select">
              {options.homes.map((h) => (
                <option key={h.id} value={h.id}>
                  {h.name} ({h.zoneCount} zone{h.zoneCount === 1 ? "" : "s"})
                </option>
              ))}
            </select>
          </label>
        ) : kind === "selection" ? (
          <span className="text-sm text-slate-600">
            {chosen.size} zone{chosen.size === 1 ? "" : "s"} chosen
            {chosen.size ? (
              <button type="button" onClick={() => setChosen(new Set())} className="ml-2 underline">
                clear
              </button>
            ) : null}
          </span>
        ) : (
          <label className="text-sm">
            <span className="sr-only">Zone template</span>
            <select value={templateId} onChange={(e) => setTemplateId(e.target.value)} className="rounded-md border border-slate-300 px-2 py-1.5">
              {options.templates.map((t) => (
                <option key={t.id} value={t.id}>
                  {t.name} ({t.zoneCount} zone{t.zoneCount === 1 ? "" : "s"})
                </option>
              ))}
            </select>
          </label>
        )}
        {scope ? (
          <PushZoneButton scope={scope} label="Preview push…" />
        ) : (
          <span className="text-sm text-slate-500">{kind === "selection" ? "Choose zones below." : "Nothing you may push."}</span>
        )}
      </div>
      {kind === "selection" ? (
        <div className="mt-3">
          <label className="text-sm">
            <span className="sr-only">Filter zones</span>
            <input
              type="search"
              value={filter}
              onChange={(e) => setFilter(e.target.value)}
              placeholder="Filter by zone or home"
              className="w-72 max-w-full rounded-md border border-slate-300 px-3 py-1.5 text-sm"
            />
          </label>
          <ul className="mt-2 grid max-h-64 gap-x-4 overflow-y-auto rounded-md border border-slate-200 p-2 text-sm sm:grid-cols-2 lg:grid-cols-3" aria-label="Zones to push">
            {shown.map((z) => (
              <li key={z.id}>
                <label className="flex items-center gap-2 py-0.5">
                  <input
                    type="checkbox"
                    checked={chosen.has(z.id)}
                    onChange={() =>
                      setChosen((c) => {
                        const next = new Set(c);
                        if (next.has(z.id)) next.delete(z.id);
                        else next.add(z.id);
                        return next;
                      })
                    }
                  />
                  <span>
                    {z.name} <span className="text-slate-500">· {z.homeName}</span>
                  </span>
                </label>
              </li>
            ))}
          </ul>
          {options.zones.length > shown.length ? <p className="mt-1 text-xs text-slate-500">Showing {shown.length} of {options.zones.length}; filter to find others.</p> : null}
        </div>
      ) : null}
    </section>
  );
}

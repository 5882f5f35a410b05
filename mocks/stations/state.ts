import { z } from "zod";
import type { Station } from "@/lib/stations/api-schema";
import { stationCatalogue } from "./catalogue";

// State of the station directory fake: its catalogue and the injected faults.

export const stationFaultSpecSchema = z.object({
  latencyMs: z.int().min(0).max(120_000).optional(),
  /** Never answer within the client's timeout: wait `ms`, then 504. */
  hang: z.object({ ms: z.int().min(1).max(600_000), calls: z.int().min(1).optional() }).nullable().optional(),
  serverErrors: z
    .object({ count: z.int().min(1), status: z.union([z.literal(500), z.literal(502), z.literal(503), z.literal(504)]).optional() })
    .nullable()
    .optional(),
  rateLimit: z.object({ count: z.int().min(1), retryAfterSeconds: z.int().min(0).optional() }).nullable().optional(),
  malformed: z
    .object({ count: z.int().min(1), kind: z.enum(["truncated", "wrong-shape"]).optional() })
    .nullable()
    .optional(),
});
export type StationFaultSpec = z.infer<typeof stationFaultSpecSchema>;

type Counted = "hang" | "serverErrors" | "rateLimit" | "malformed";

export type StationDirectoryState = ReturnType<typeof createStationDirectoryState>;

export function createStationDirectoryState(options: { stations?: Station[] } = {}) {
  const stations = options.stations ?? stationCatalogue;
  let faults: StationFaultSpec = {};
  const timers = new Set<{ handle: ReturnType<typeof setTimeout>; resolve: () => void }>();

  return {
    stations,

    search(query: { q?: string; genre?: string; limit: number }): { stations: Station[]; total: number } {
      const words = (query.q ?? "").toLowerCase().split(/\s+/).filter(Boolean);
      const genre = query.genre?.toLowerCase();
      const matches = stations.filter((s) => {
        if (genre && s.genre !== genre && !s.tags.includes(genre)) return false;
        const haystack = [s.name, s.genre, ...s.tags].join(" ").toLowerCase();
        return words.every((w) => haystack.includes(w));
      });
      // Name matches first, then alphabetical: what someone typing a name expects.
      const nameHits = (s: Station) => words.filter((w) => s.name.toLowerCase().includes(w)).length;
      matches.sort((a, b) => nameHits(b) - nameHits(a) || a.name.localeCompare(b.name));
      return { stations: matches.slice(0, query.limit), total: matches.length };
    },

    setFaults(spec: StationFaultSpec): void {
      const next: StationFaultSpec = { ...faults };
      for (const [key, value] of Object.entries(spec) as [keyof StationFaultSpec, unknown][]) {
        if (value === undefined) continue;
        if (value === null) delete next[key];
        else Object.assign(next, { [key]: value });
      }
      faults = next;
    },

    clearFaults(): void {
      faults = {};
    },

    faults(): StationFaultSpec {
      return structuredClone(faults);
    },

    /** Consumes the counted faults for one call; at most one of them strikes. */
    takeFaults() {
      const take = <K extends Counted>(key: K): NonNullable<StationFaultSpec[K]> | null => {
        const fault = faults[key];
        if (!fault) return null;
        const remaining = "calls" in fault ? fault.calls : "count" in fault ? fault.count : undefined;
        if (remaining !== undefined) {
          const next = { ...faults };
          if (remaining <= 1) delete next[key];
          else Object.assign(next, { [key]: { ...fault, ["calls" in fault ? "calls" : "count"]: remaining - 1 } });
          faults = next;
        }
        return fault as NonNullable<StationFaultSpec[K]>;
      };
      const hang = take("hang");
      const serverErrors = hang ? null : take("serverErrors");
      const rateLimit = hang || serverErrors ? null : take("rateLimit");
      const malformed = hang || serverErrors || rateLimit ? null : take("malformed");
      return { latencyMs: faults.latencyMs ?? 0, hang, serverErrors, rateLimit, malformed };
    },

    /** A wait that ends early on abort or dispose, so a hung request never outlives a test. */
    wait(ms: number, signal?: AbortSignal): Promise<void> {
      return new Promise((resolve) => {
        if (signal?.aborted) return resolve();
        const entry = {
          handle: setTimeout(() => {
            timers.delete(entry);
            resolve();
          }, ms),
          resolve: () => {
            clearTimeout(entry.handle);
            timers.delete(entry);
            resolve();
          },
        };
        entry.handle.unref?.();
        timers.add(entry);
        signal?.addEventListener("abort", () => entry.resolve(), { once: true });
      });
    },

    dispose(): void {
      for (const timer of [...timers]) timer.resolve();
    },
  };
}

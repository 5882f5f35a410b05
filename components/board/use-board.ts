"use client";
import { useCallback, useMemo, useRef, useState } from "react";
import useSWR, { useSWRConfig } from "swr";
import { mergeZones } from "@/lib/board/optimistic";
import type { BoardDto, BoardWriteResult, ZoneColumnDto } from "@/lib/board/types";
import { ApiError } from "@/lib/fetcher";
import { boardUrl } from "@/lib/validation/board";

// The board's data and its writes. What is shown = the last board the server
// confirmed + the transforms of writes still on their way. Writes go out one
// after another, each naming the zone version it is based on as confirmed at
// the moment it is sent; a refused write drops its transform (the rollback)
// and leaves a message, and a stale write (409) offers to reload.

export interface WriteOutcome {
  ok: boolean;
  error?: ApiError;
}

export interface BoardNotice {
  id: number;
  tone: "refused" | "error" | "done";
  text: string;
}

interface PendingWrite {
  id: number;
  apply: (board: BoardDto) => BoardDto;
}

export interface BoardWrite {
  /** Shown in messages: "Reorder presets of Kitchen". */
  label: string;
  optimistic?: (board: BoardDto) => BoardDto;
  /** Sends the request; `zone(id)` gives the zone as last confirmed (with its version). */
  send: (zone: (id: string) => ZoneColumnDto) => Promise<BoardWriteResult>;
  /** The caller shows errors itself (dialogs); still rolled back, still offers reload on 409. */
  quiet?: boolean;
}

let sequence = 0;

export function useBoard(homeId: string) {
  const key = boardUrl(homeId);
  const { cache } = useSWRConfig();
  const { data: confirmed, error, mutate, isValidating } = useSWR<BoardDto, ApiError>(key, { revalidateOnFocus: false, revalidateIfStale: false });
  const [pending, setPending] = useState<PendingWrite[]>([]);
  const [notices, setNotices] = useState<BoardNotice[]>([]);
  const [conflict, setConflict] = useState<string | null>(null);
  const queue = useRef<Promise<unknown>>(Promise.resolve());
  // Data seeded through SWR's fallback is not in the cache until something is
  // written there, so the last confirmed board is also kept here.
  const confirmedRef = useRef(confirmed);
  confirmedRef.current = confirmed;

  const board = useMemo(() => (confirmed ? pending.reduce((b, w) => w.apply(b), confirmed) : undefined), [confirmed, pending]);

  const notify = useCallback((tone: BoardNotice["tone"], text: string) => {
    const id = ++sequence;
    setNotices((n) => [...n.slice(-3), { id, tone, text }]);
    return id;
  }, []);

  const dismiss = useCallback((id: number) => setNotices((n) => n.filter((x) => x.id !== id)), []);

  const write = useCallback(
    (op: BoardWrite): Promise<WriteOutcome> => {
      const entry: PendingWrite = { id: ++sequence, apply: op.optimistic ?? ((b) => b) };
      setPending((p) => [...p, entry]);
      const run = queue.current.then(async (): Promise<WriteOutcome> => {
        try {
          const latest = (cache.get(key)?.data as BoardDto | undefined) ?? confirmedRef.current;
          const zone = (id: string) => {
            const found = latest?.zones.find((z) => z.id === id);
            if (!found) throw new ApiError(404, "zone:not-found", "That zone is no longer on this board. Reload it.");
            return found;
          };
          const result = await op.send(zone);
          await mutate(
            (current) => {
              const base = current ?? (cache.get(key)?.data as BoardDto | undefined) ?? confirmedRef.current;
              return base ? mergeZones(base, result.zones) : base;
            },
            { revalidate: false },
          );
          return { ok: true };
        } catch (e) {
          const err = e instanceof ApiError ? e : new ApiError(0, "network", "The server could not be reached. Nothing was changed.");
          if (err.code === "zone:stale") {
            setConflict(`${op.label}: ${err.message}`);
          } else if (!op.quiet) {
            notify(err.status === 0 ? "error" : "refused", `${op.label} was not saved. ${err.message}`);
          }
          return { ok: false, error: err };
        } finally {
          setPending((p) => p.filter((w) => w.id !== entry.id));
        }
      });
      queue.current = run;
      return run;
    },
    [cache, key, mutate, notify],
  );

  const reload = useCallback(async () => {
    setConflict(null);
    await mutate();
  }, [mutate]);

  return {
    board,
    error,
    isValidating,
    saving: pending.length > 0,
    write,
    notices,
    notify,
    dismiss,
    conflict,
    dismissConflict: () => setConflict(null),
    reload,
  };
}

export type BoardApi = ReturnType<typeof useBoard>;

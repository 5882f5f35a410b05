"use client";
import { SWRConfig } from "swr";
import { fetcher } from "@/lib/fetcher";

/** Seeds SWR with what the server already read, so the first paint needs no fetch. */
export function SWRProvider({ fallback, children }: { fallback: Record<string, unknown>; children: React.ReactNode }) {
  return <SWRConfig value={{ fetcher, fallback, revalidateOnFocus: false }}>{children}</SWRConfig>;
}

"use client";
import { useEffect, useState } from "react";

/**
 * False during server render and until React has attached its handlers. Forms
 * with passwords keep their submit disabled until then (a native submit would
 * put the fields in the URL), and roots expose it as data-hydrated for tests.
 */
export function useHydrated(): boolean {
  const [hydrated, setHydrated] = useState(false);
  useEffect(() => setHydrated(true), []);
  return hydrated;
}

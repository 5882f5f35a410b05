// Pure, dependency-free (safe in client bundles): override paths of zones.overrides.
// A path also covers everything beneath it: "sources" covers "sources[analog].label".

/** Is this path (or a path above it) set by the zone itself? */
export function isOverridden(path: string, overrides: readonly string[]): boolean {
  return overrides.some((o) => path === o || path.startsWith(`${o}.`) || path.startsWith(`${o}[`));
}

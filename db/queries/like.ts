/** A user's search text as a LIKE/ILIKE pattern fragment: %, _ and \ match themselves. */
export function escapeLike(value: string): string {
  return value.replace(/[\\%_]/g, (c) => `\\${c}`);
}

// A trivial handler without database or session: liveness checks, and the
// floor the board benchmark (tests/bench/board-api.ts) measures against.
export const dynamic = "force-dynamic";

export function GET() {
  return Response.json({ ok: true });
}

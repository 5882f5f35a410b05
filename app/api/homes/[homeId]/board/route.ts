import { getBoardBody } from "@/db/queries/board";
import { apiHandler } from "@/lib/api/handler";
import { homeIdParamsSchema } from "@/lib/validation/homes";

// The whole zone board of one home in one answer (see db/queries/board.ts).
// The browser keeps it and asks again with If-None-Match; an unchanged board
// answers 304 without a body.
export const GET = apiHandler({ params: homeIdParamsSchema }, async ({ actor, params, request }) => {
  const { etag, parts } = await getBoardBody({ actor, homeId: params.homeId });
  const headers = { etag, "cache-control": "private, no-cache" };
  const ifNoneMatch = request.headers.get("if-none-match");
  if (ifNoneMatch && ifNoneMatch.split(",").some((tag) => tag.trim() === etag)) {
    return new Response(null, { status: 304, headers });
  }
  // Streamed as its two parts, so the cached columns are written out without a copy.
  const body = new ReadableStream<Uint8Array>({
    start(controller) {
      for (const part of parts) controller.enqueue(part);
      controller.close();
    },
  });
  return new Response(body, {
    headers: { ...headers, "content-type": "application/json", "content-length": String(parts[0].byteLength + parts[1].byteLength) },
  });
});

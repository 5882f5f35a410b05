import { ACTIVITY_EXPORT_LIMIT, activityBatches, countActivity } from "@/db/queries/history";
import { ACTIVITY_CSV_HEADER, activityCsvRow } from "@/lib/history/activity-csv";
import { apiHandler } from "@/lib/api/handler";
import { activityQuerySchema } from "@/lib/validation/history";

// The filtered audit trail as CSV, streamed in batches (never all rows in
// memory), bounded at ACTIVITY_EXPORT_LIMIT rows; the response says when it was cut.
export const GET = apiHandler({ query: activityQuerySchema }, async ({ actor, query }) => {
  const { page: _page, pageSize: _pageSize, ...filters } = query;
  const total = await countActivity({ actor, filters });
  const batches = activityBatches({ actor, filters });
  const encoder = new TextEncoder();
  const stream = new ReadableStream<Uint8Array>({
    start(controller) {
      // A byte-order mark so spreadsheet programs read the file as UTF-8.
      controller.enqueue(encoder.encode(`\uFEFF${ACTIVITY_CSV_HEADER.join(",")}\r\n`));
    },
    async pull(controller) {
      try {
        const next = await batches.next();
        if (next.done) {
          controller.close();
          return;
        }
        controller.enqueue(encoder.encode(next.value.map((item) => `${activityCsvRow(item)}\r\n`).join("")));
      } catch (error) {
        console.error("[activity export] failed mid-stream", error);
        controller.error(error);
      }
    },
    async cancel() {
      await batches.return(undefined);
    },
  });
  const day = new Date().toISOString().slice(0, 10);
  const scope = query.home ? "home-" : "";
  const filename = `zonewright-activity-${scope}${day}.csv`;
  return new Response(stream, {
    headers: {
      "content-type": "text/csv; charset=utf-8",
      "content-disposition": `attachment; filename="${filename}"`,
      "cache-control": "no-store",
      "x-zonewright-rows": String(Math.min(total, ACTIVITY_EXPORT_LIMIT)),
      "x-zonewright-truncated": total > ACTIVITY_EXPORT_LIMIT ? "true" : "false",
    },
  });
});

// Test support: empty every table of ours (and the job queue) and load the demo
// scenario again, so each suite starts from the same known state.
import pg from "pg";
import { seedDemo } from "@/db/seed";

export async function resetAndSeed(databaseUrl: string) {
  const client = new pg.Client({ connectionString: databaseUrl });
  await client.connect();
  try {
    const { rows } = await client.query<{ tablename: string }>("select tablename from pg_tables where schemaname = 'public'");
    if (rows.length) {
      await client.query(`truncate table ${rows.map((r) => `"public"."${r.tablename}"`).join(", ")} restart identity cascade`);
    }
    const queue = await client.query("select 1 from pg_tables where schemaname = 'pgboss' and tablename = 'job'");
    if (queue.rowCount) await client.query("truncate table pgboss.job");
  } finally {
    await client.end();
  }
  await seedDemo(databaseUrl);
}

import pg from "pg";
import { seedDemo } from "@/db/seed";

export async function resetDatabase() {
  const url = process.env.DATABASE_URL!;
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  try {
    const { rows } = await client.query<{ tablename: string }>("select tablename from pg_tables where schemaname = 'public'");
    if (rows.length) {
      await client.query(`truncate table ${rows.map((r) => `"public"."${r.tablename}"`).join(", ")} restart identity cascade`);
    }
  } finally {
    await client.end();
  }
  await seedDemo(url);
}

export async function query<T extends pg.QueryResultRow>(sql: string, params: unknown[] = []): Promise<T[]> {
  const client = new pg.Client({ connectionString: process.env.DATABASE_URL! });
  await client.connect();
  try {
    return (await client.query<T>(sql, params)).rows;
  } finally {
    await client.end();
  }
}

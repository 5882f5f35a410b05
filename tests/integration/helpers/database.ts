import pg from "pg";
import { resetAndSeed } from "@/db/reset";

export async function resetDatabase() {
  await resetAndSeed(process.env.DATABASE_URL!);
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

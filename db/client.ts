import { drizzle } from "drizzle-orm/node-postgres";
import pg from "pg";
import * as schema from "@/db/schema";
import { env } from "@/lib/env";

// One pool per process; kept on globalThis so hot reload does not leak pools.
const globalForDb = globalThis as unknown as { __zonewrightPool?: pg.Pool };

export const pool =
  globalForDb.__zonewrightPool ??
  new pg.Pool({ connectionString: env().DATABASE_URL, max: env().DATABASE_POOL_MAX });
globalForDb.__zonewrightPool = pool;

export const db = drizzle(pool, { schema, casing: "snake_case" });
export type Database = typeof db;
export type Transaction = Parameters<Parameters<Database["transaction"]>[0]>[0];

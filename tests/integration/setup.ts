import { beforeAll } from "vitest";
import { resetDatabase } from "./helpers/database";

if (!process.env.DATABASE_URL?.includes("_test")) {
  throw new Error("Integration tests need the test database: run them through `npm test` (it starts its own PostgreSQL).");
}

// Every test file starts from the freshly seeded demo scenario.
beforeAll(async () => {
  await resetDatabase();
});

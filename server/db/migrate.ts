import { fileURLToPath } from "node:url";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import type { Db } from "./client";

const migrationsFolder = fileURLToPath(new URL("../../drizzle", import.meta.url));

/** Applies pending migrations from drizzle/ (a no-op when up to date). */
export async function runMigrations(db: Db) {
  await migrate(db, { migrationsFolder });
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const { db, pool } = await import("./client");
  await runMigrations(db);
  await pool.end();
  console.log("migrations applied");
}

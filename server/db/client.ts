import pg from "pg";
import { drizzle } from "drizzle-orm/node-postgres";
import { env } from "../env";
import * as schema from "./schema";

export const pool = new pg.Pool({ connectionString: env.DATABASE_URL, max: 20, connectionTimeoutMillis: 5000 });
// An idle client losing its connection (e.g. PostgreSQL restarted) must not crash the process.
pool.on("error", () => {});

export const db = drizzle(pool, { schema, casing: "snake_case" });
export type Db = typeof db;

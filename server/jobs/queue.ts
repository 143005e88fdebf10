import PgBoss from "pg-boss";
import { env } from "../env";

/** The Postgres-backed job queue (pg-boss, schema "pgboss"). Every app server and worker shares it. */
export function createQueue() {
  return new PgBoss({ connectionString: env.DATABASE_URL, schema: "pgboss" });
}

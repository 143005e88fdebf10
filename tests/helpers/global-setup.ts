import { execFileSync } from "node:child_process";
import pg from "pg";

/**
 * API-test setup: makes sure the test cluster runs, gives the API tests a fresh database with every
 * migration applied, and starts the fake SMTP server that keeps mail in that database.
 */
export default async function setup() {
  const url = new URL(process.env.TEST_DATABASE_URL ?? `postgres://postgres@127.0.0.1:${process.env.TEST_PG_PORT ?? "55433"}/tauline_api`);
  const dbName = url.pathname.slice(1);
  execFileSync("bash", ["scripts/pg.sh", "start", process.env.TEST_PG_DIR ?? ".pg-test", url.port, "postgres"], { stdio: "inherit" });
  const admin = new pg.Client({ connectionString: `postgres://postgres@127.0.0.1:${url.port}/postgres` });
  await admin.connect();
  await admin.query(`drop database if exists ${dbName} with (force)`);
  await admin.query(`create database ${dbName}`);
  await admin.end();

  process.env.DATABASE_URL = url.toString();
  process.env.SMTP_PORT = process.env.TEST_SMTP_PORT ?? "2626";
  process.env.NODE_ENV = "test";
  process.env.LOG_LEVEL = "silent";
  const { db, pool } = await import("../../server/db/client");
  const { runMigrations } = await import("../../server/db/migrate");
  await runMigrations(db);
  const { createFakeSmtp } = await import("../../server/mail/fake-smtp");
  const smtp = createFakeSmtp(db);
  await smtp.listen(Number(process.env.SMTP_PORT));
  return async () => {
    await smtp.close();
    await pool.end();
  };
}

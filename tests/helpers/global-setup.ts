import { execFileSync } from "node:child_process";
import pg from "pg";
import type { TestProject } from "vitest/node";

/**
 * API-test setup: makes sure the test cluster runs, gives the API tests a fresh database with every
 * migration applied, and starts the fake SMTP server that keeps mail in that database.
 */
export default async function setup(project: TestProject) {
  const env = project.config.env as Record<string, string>;
  const url = new URL(env.DATABASE_URL!);
  const dbName = url.pathname.slice(1);
  const pgDir = process.env.TEST_PG_DIR ?? ".pg-test";
  // A cluster this setup starts is stopped again at the end, so a direct `npx vitest` leaves nothing running.
  const wasRunning = await reachable(`postgres://postgres@127.0.0.1:${url.port}/postgres`);
  execFileSync("bash", ["scripts/pg.sh", "start", pgDir, url.port, "postgres"], { stdio: "inherit" });
  const adminUrl = `postgres://postgres@127.0.0.1:${url.port}/postgres`;
  const admin = new pg.Client({ connectionString: adminUrl });
  await admin.connect();
  await admin.query(`drop database if exists ${dbName} with (force)`);
  await admin.query(`create database ${dbName}`);
  await admin.end();

  process.env.DATABASE_URL = url.toString();
  process.env.SMTP_PORT = env.SMTP_PORT;
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
    const c = new pg.Client({ connectionString: adminUrl });
    await c.connect();
    await c.query(`drop database if exists ${dbName} with (force)`);
    await c.end();
    if (!wasRunning) execFileSync("bash", ["scripts/pg.sh", "stop", pgDir], { stdio: "inherit" });
  };
}

async function reachable(connectionString: string): Promise<boolean> {
  const c = new pg.Client({ connectionString, connectionTimeoutMillis: 2000 });
  try {
    await c.connect();
    await c.end();
    return true;
  } catch {
    return false;
  }
}

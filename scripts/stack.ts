/**
 * Starts everything Tauline needs on one machine: the private PostgreSQL cluster, migrations, demo
 * data, the fake SMTP server, the API (serving the built client) and a processing worker. Ctrl-C
 * stops all of it, PostgreSQL included. Used by `npm start` and by the browser tests.
 *
 * Settings (environment): PG_DIR (.pg), PG_PORT (54329), PG_DB (tauline), PORT (3000), SMTP_PORT (2525), DEMO (1).
 */
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { fileURLToPath } from "node:url";

const root = fileURLToPath(new URL("..", import.meta.url));
const pgDir = process.env.PG_DIR ?? ".pg";
const pgPort = process.env.PG_PORT ?? "54329";
const pgDb = process.env.PG_DB ?? "tauline";
const port = process.env.PORT ?? "3000";
const smtpPort = process.env.SMTP_PORT ?? "2525";
const demo = (process.env.DEMO ?? "1") !== "0";
const publicUrl = process.env.PUBLIC_URL ?? `http://127.0.0.1:${port}`;

const env: NodeJS.ProcessEnv = {
  ...process.env,
  DATABASE_URL: process.env.DATABASE_URL ?? `postgres://postgres@127.0.0.1:${pgPort}/${pgDb}`,
  PORT: port,
  SMTP_PORT: smtpPort,
  PUBLIC_URL: publicUrl,
  DEMO: demo ? "true" : "false",
};

const say = (msg: string) => process.stdout.write(`[tauline] ${msg}\n`);

function run(cmd: string, args: string[]) {
  const r = spawnSync(cmd, args, { cwd: root, env, stdio: "inherit" });
  if (r.status !== 0) {
    say(`${cmd} ${args.join(" ")} failed (exit ${r.status})`);
    process.exit(1);
  }
}

say(`starting PostgreSQL in ${pgDir} on 127.0.0.1:${pgPort}`);
run("bash", ["scripts/pg.sh", "start", pgDir, pgPort, pgDb]);
if (process.env.FRESH_DB === "1") {
  // Browser tests start from an empty database every run.
  const { default: pg } = await import("pg");
  const c = new pg.Client({ connectionString: `postgres://postgres@127.0.0.1:${pgPort}/postgres` });
  await c.connect();
  await c.query(`drop database if exists "${pgDb}" with (force)`);
  await c.query(`create database "${pgDb}"`);
  await c.end();
}
run(process.execPath, ["--import", "tsx", "server/db/migrate.ts"]);

const children: { name: string; proc: ChildProcess }[] = [];
function start(name: string, entry: string) {
  const proc = spawn(process.execPath, ["--import", "tsx", entry], { cwd: root, env, stdio: ["ignore", "inherit", "inherit"] });
  proc.on("exit", (code, signal) => {
    if (!stopping) {
      say(`${name} stopped unexpectedly (${signal ?? `exit ${code}`}); shutting down`);
      void shutdown(1);
    }
  });
  children.push({ name, proc });
}

/** Waits until something accepts TCP connections on 127.0.0.1:port (up to 30 s). */
async function waitForPort(p: number, what: string) {
  const { connect } = await import("node:net");
  for (let i = 0; i < 120 && !stopping; i++) {
    const up = await new Promise<boolean>((resolve) => {
      const sock = connect(p, "127.0.0.1");
      sock.once("connect", () => (sock.destroy(), resolve(true)));
      sock.once("error", () => resolve(false));
    });
    if (up) return;
    await new Promise((r) => setTimeout(r, 250));
  }
  if (!stopping) say(`${what} did not start listening on ${p}; going on without it`);
}

let stopping = false;
async function shutdown(code: number) {
  if (stopping) return;
  stopping = true;
  say("stopping…");
  await Promise.all(
    children.map(
      ({ proc }) =>
        new Promise<void>((resolve) => {
          if (proc.exitCode !== null || proc.signalCode !== null) return resolve();
          proc.once("exit", () => resolve());
          proc.kill("SIGTERM");
          setTimeout(() => proc.kill("SIGKILL"), 8000).unref();
        }),
    ),
  );
  if (process.env.KEEP_PG !== "1") spawnSync("bash", ["scripts/pg.sh", "stop", pgDir], { cwd: root, stdio: "inherit" });
  say("stopped");
  process.exit(code);
}
process.on("SIGINT", () => void shutdown(0));
process.on("SIGTERM", () => void shutdown(0));

// Mail first: the demo seed's curation steps send notifications, which the fake SMTP server must take.
start("mail", "server/mail/smtp-main.ts");
await waitForPort(Number(smtpPort), "the fake SMTP server");
if (demo) run(process.execPath, ["--import", "tsx", "server/db/seed.ts"]);
start("api", "server/index.ts");
start("worker", "server/worker.ts");

// Wait until the API answers, then tell the user where to go.
for (let i = 0; i < 120 && !stopping; i++) {
  try {
    const res = await fetch(`http://127.0.0.1:${port}/api/health`);
    if (res.ok) break;
  } catch {
    /* not up yet */
  }
  await new Promise((r) => setTimeout(r, 250));
}
if (!stopping) {
  const lines = [`Tauline is running at ${publicUrl}`, `Outgoing mail is kept by the fake SMTP server on 127.0.0.1:${smtpPort} (admins: Admin → Outgoing mail)`];
  if (demo) {
    const { demoUsers, demoPassword } = await import("../server/db/seed");
    lines.push("Demo accounts (invented people; demo mode only), password for all: " + demoPassword);
    for (const u of demoUsers) lines.push(`  ${u.key.padEnd(12)} ${u.email}`);
  }
  lines.push("Press Ctrl-C to stop everything (PostgreSQL included).");
  say("\n" + lines.join("\n"));
}

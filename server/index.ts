import { createApp } from "./app";
import { pool } from "./db/client";
import { env } from "./env";
import { logger } from "./lib/logger";

const app = createApp();
const server = app.listen(env.PORT, env.HOST, () => {
  logger.info(`Tauline API listening on http://${env.HOST}:${env.PORT}`);
});

let stopping = false;
function shutdown(signal: string) {
  if (stopping) return;
  stopping = true;
  logger.info(`${signal}: closing`);
  server.close(() => void pool.end().finally(() => process.exit(0)));
  setTimeout(() => process.exit(0), 5000).unref();
}
process.on("SIGINT", () => shutdown("SIGINT"));
process.on("SIGTERM", () => shutdown("SIGTERM"));

import { db, pool } from "../db/client";
import { env } from "../env";
import { logger } from "../lib/logger";
import { createFakeSmtp } from "./fake-smtp";

/** Entry point of the local fake SMTP server process (started by `npm start`). */
const smtp = createFakeSmtp(
  db,
  (id) => logger.info({ id }, "mail captured"),
  (err) => logger.warn({ err }, "an SMTP client connection ended with an error"),
);
const port = await smtp.listen(env.SMTP_PORT, env.SMTP_HOST);
logger.info(`fake SMTP server keeping mail in PostgreSQL, listening on ${env.SMTP_HOST}:${port}`);

const stop = () => void smtp.close().then(() => pool.end()).finally(() => process.exit(0));
process.on("SIGINT", stop);
process.on("SIGTERM", stop);

import nodemailer from "nodemailer";
import { env } from "../env";
import { logger } from "../lib/logger";

const transport = nodemailer.createTransport({
  host: env.SMTP_HOST,
  port: env.SMTP_PORT,
  secure: false,
  ignoreTLS: true,
  connectionTimeout: 5000,
});

/** Sends a plain-text message. Failures are logged, not thrown: a lost notice must not undo the action that caused it. */
export async function sendMail(to: string | string[], subject: string, text: string): Promise<boolean> {
  try {
    await transport.sendMail({ from: env.MAIL_FROM, to, subject, text });
    return true;
  } catch (err) {
    logger.error({ err, subject }, "mail could not be sent");
    return false;
  }
}

import { SMTPServer } from "smtp-server";
import { simpleParser } from "mailparser";
import type { Db } from "../db/client";
import { mailMessages } from "../db/schema";

/**
 * The local fake SMTP server: accepts every message on loopback and keeps it in PostgreSQL, where
 * admins read it on the outgoing-mail page. Nothing is relayed anywhere.
 */
export function createFakeSmtp(
  db: Db,
  onStored?: (id: string) => void,
  onConnectionError?: (err: Error) => void,
) {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ["STARTTLS", "AUTH"],
    logger: false,
    size: 5 * 1024 * 1024,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on("data", (c: Buffer) => chunks.push(c));
      stream.on("end", async () => {
        try {
          const raw = Buffer.concat(chunks);
          const parsed = await simpleParser(raw);
          const envelopeTo = session.envelope.rcptTo.map((r) => r.address);
          const from = session.envelope.mailFrom ? session.envelope.mailFrom.address : "";
          const [row] = await db
            .insert(mailMessages)
            .values({
              from: parsed.from?.text ?? from,
              to: envelopeTo,
              subject: parsed.subject ?? "",
              text: parsed.text ?? "",
              raw: raw.toString("utf8"),
            })
            .returning({ id: mailMessages.id });
          onStored?.(row!.id);
          callback();
        } catch (err) {
          callback(err as Error);
        }
      });
    },
  });
  // A client that drops its connection (a test process exiting mid-conversation, a reset socket)
  // makes the server emit "error". With no listener Node would end the whole process, so every
  // error after start-up is reported and the server goes on serving other connections.
  let listening = false;
  server.on("error", (err: Error) => {
    if (listening) onConnectionError?.(err);
  });
  return {
    listen: (port: number, host = "127.0.0.1") =>
      new Promise<number>((resolve, reject) => {
        server.once("error", reject);
        server.listen(port, host, () => {
          server.off("error", reject);
          listening = true;
          const addr = server.server.address();
          resolve(typeof addr === "object" && addr ? addr.port : port);
        });
      }),
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}

import net from "node:net";
import { eq } from "drizzle-orm";
import nodemailer from "nodemailer";
import { afterAll, beforeAll, expect, test } from "vitest";
import { db } from "../../server/db/client";
import { mailMessages } from "../../server/db/schema";
import { createFakeSmtp } from "../../server/mail/fake-smtp";

/**
 * The fake SMTP server runs beside the app (and inside the test set-up); a client that resets its
 * connection must not end it. Before this was handled, one reset socket stopped the whole API suite.
 */
const errors: Error[] = [];
const smtp = createFakeSmtp(db, undefined, (err) => errors.push(err));
let port = 0;
beforeAll(async () => {
  port = await smtp.listen(0);
});
afterAll(() => smtp.close());

/** Opens a mail transaction (EHLO, MAIL FROM, RCPT TO, DATA) and drops it with a TCP reset mid-message. */
function resetMidMessage(): Promise<void> {
  return new Promise((resolve, reject) => {
    const socket = net.connect(port, "127.0.0.1");
    socket.once("error", reject);
    const script = ["EHLO tauline.test", "MAIL FROM:<logger@merrow.example>", "RCPT TO:<nobody@merrow.example>", "DATA"];
    let buffered = "";
    socket.on("data", (chunk: Buffer) => {
      buffered += chunk.toString("latin1");
      // Each reply ends with a line "NNN text" (a space after the code, not a dash).
      if (!/(^|\r\n)\d{3} [^\r\n]*\r\n$/.test(buffered)) return;
      buffered = "";
      const next = script.shift();
      if (next !== undefined) socket.write(`${next}\r\n`);
      else {
        // Send more than the server reads at once, then reset while it still holds unread bytes:
        // its next read fails with ECONNRESET inside an open mail transaction.
        socket.write(`Subject: cut off\r\n\r\n${"a half-sent message ".repeat(200_000)}`);
        socket.resetAndDestroy();
        resolve();
      }
    });
  });
}

test("a client that resets its connection is reported and the server goes on accepting mail", async () => {
  await resetMidMessage();
  await resetMidMessage();
  await new Promise((r) => setTimeout(r, 200));
  expect(errors.length).toBeGreaterThan(0);
  expect(errors.every((e) => (e as NodeJS.ErrnoException).code === "ECONNRESET")).toBe(true);

  const subject = `after a reset ${Date.now()}`;
  const transport = nodemailer.createTransport({ host: "127.0.0.1", port, secure: false, ignoreTLS: true });
  await transport.sendMail({ from: "tauline@merrow.example", to: "reset-check@merrow.example", subject, text: "still here" });
  const [row] = await db.select().from(mailMessages).where(eq(mailMessages.subject, subject));
  expect(row).toMatchObject({ to: ["reset-check@merrow.example"], text: "still here\n" });
});

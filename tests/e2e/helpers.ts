import { createServer, request as httpRequest } from "node:http";
import type { AddressInfo } from "node:net";
import { expect, type Page } from "@playwright/test";

export const DEMO_PASSWORD = "tauline-demo-2026";
export const demo = {
  admin: "admin@merrow.example",
  contributor: "data@merrow.example",
  curator: "curator@merrow.example",
  curator2: "curator2@merrow.example",
};

/** Signs in through the sign-in page and waits for the signed-in shell. */
export async function signIn(page: Page, email: string, password = DEMO_PASSWORD) {
  await page.goto("/sign-in");
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByRole("link", { name: "My projects" })).toBeVisible();
}

/** Saves a full-page screenshot as a test artifact. */
export async function shot(page: Page, name: string) {
  await page.screenshot({ path: `tests/artifacts/screenshots/${name}.png`, fullPage: true });
}

export interface FlakyLink {
  /** The origin to browse through, e.g. http://127.0.0.1:41234. */
  url: string;
  /** Bytes of upload bodies (tus PATCH) forwarded so far. */
  uploaded(): number;
  /** Resolves when the link was cut. */
  cut: Promise<number>;
  close(): Promise<void>;
}

/**
 * A loopback HTTP relay in front of the app that drops the connection of the first upload request (tus PATCH) once
 * `cutAfterBytes` of its body went through, then refuses every connection for `downForMs`, as a train entering a
 * tunnel would. The Origin header is rewritten to the app's own, so the app sees the browser as it would directly.
 */
export async function flakyLink(target: string, opts: { cutAfterBytes: number; downForMs: number }): Promise<FlakyLink> {
  const t = new URL(target);
  let sent = 0;
  let cutDone = false;
  let downUntil = 0;
  let markCut!: (n: number) => void;
  const cut = new Promise<number>((r) => (markCut = r));
  const server = createServer((req, res) => {
    if (Date.now() < downUntil) {
      req.socket.destroy();
      return;
    }
    const headers = { ...req.headers, host: t.host };
    if (headers.origin) headers.origin = t.origin;
    const isUpload = req.method === "PATCH" && req.url?.startsWith("/api/uploads/");
    const out = httpRequest({ host: t.hostname, port: t.port, method: req.method, path: req.url, headers }, (up) => {
      res.writeHead(up.statusCode ?? 502, up.headers);
      up.pipe(res);
    });
    out.on("error", () => res.destroy());
    let dropping = false;
    req.on("data", (chunk: Buffer) => {
      if (dropping) return;
      if (isUpload && !cutDone) {
        sent += chunk.length;
        if (sent >= opts.cutAfterBytes) {
          // Forward nothing more; let what was written reach the app, then drop both sides mid-body.
          cutDone = true;
          dropping = true;
          sent -= chunk.length;
          downUntil = Date.now() + opts.downForMs;
          req.pause();
          setTimeout(() => {
            out.destroy();
            req.socket.destroy();
            markCut(sent);
          }, 300);
          return;
        }
      } else if (isUpload) sent += chunk.length;
      if (!out.destroyed) out.write(chunk);
    });
    req.on("end", () => {
      if (!out.destroyed) out.end();
    });
  });
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", () => r()));
  const port = (server.address() as AddressInfo).port;
  return {
    url: `http://127.0.0.1:${port}`,
    uploaded: () => sent,
    cut,
    close: () =>
      new Promise<void>((r) => {
        server.closeAllConnections();
        server.close(() => r());
      }),
  };
}

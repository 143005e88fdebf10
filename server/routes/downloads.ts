import type { RequestHandler, Response } from "express";
import { rateLimit } from "express-rate-limit";
import { z } from "zod";
import { idSchema } from "@shared/schemas/common";
import { downloadQuerySchema } from "@shared/schemas/downloads";
import { apiRouter } from "../lib/routes";
import { logger } from "../lib/logger";
import { PgRateLimitStore } from "../lib/pg-rate-limit-store";
import { contentDisposition, downloadFileName, formatMediaType, openReleaseFile, planDownload, verifyRelease, writeDownload } from "../services/downloads";
import { idParamsSchema } from "@shared/schemas/common";

/**
 * Anonymous downloads per IP and minute (DOWNLOAD_RATE_LIMIT, default 30), counted in PostgreSQL across app
 * servers (`scope` as in AppOptions.rateLimitScope). Signed-in people and API tokens are not limited here: they
 * are accountable, and scripts with tokens are the intended bulk route.
 */
export const anonymousDownloadLimit = (scope = ""): RequestHandler =>
  rateLimit({
    windowMs: 60_000,
    store: new PgRateLimitStore(`${scope}download-ip:`),
    limit: () => Number(process.env.DOWNLOAD_RATE_LIMIT ?? 30),
    standardHeaders: "draft-8",
    legacyHeaders: false,
    skip: (req) => !!req.user,
    handler: (req, res) => {
      res.status(429).json({
        error: {
          code: "rate_limited",
          message: "Too many downloads from this address; wait a minute, or sign in or use an API token for bulk downloads",
          requestId: String(req.id),
        },
      });
    },
  });

/** Paths the anonymous limit covers (mounted before the routers, after the session or token is known). */
export const DOWNLOAD_PATHS = ["/api/v1/versions/:id/download", "/api/v1/releases/:id/files/:name", "/api/v1/releases/:id/verify"];

/** Streams into the response; once bytes have left, a failure aborts the connection instead of ending it cleanly. */
async function streamInto(res: Response, write: (out: Response) => Promise<void>, what: string) {
  try {
    await write(res);
  } catch (err) {
    if (!res.headersSent) throw err;
    logger.error({ err }, `${what} failed while streaming`);
    res.destroy(err instanceof Error ? err : new Error(String(err)));
  }
}

export const downloadsApi = apiRouter("/api/v1/versions");

// GET /api/v1/versions/:id/download
downloadsApi.get("/:id/download", "public", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  const query = downloadQuerySchema.parse(req.query);
  const plan = await planDownload(req.user, id, query);
  res.set({
    "Content-Type": formatMediaType[query.format],
    "Content-Disposition": contentDisposition(downloadFileName(plan, query.format)),
    "Cache-Control": plan.versionState === "released" || plan.versionState === "superseded" ? "public, max-age=300" : "private, no-store",
    "X-Content-Type-Options": "nosniff",
  });
  await streamInto(res, (out) => writeDownload(plan, query.format, out), "download");
});

export const releaseFilesApi = apiRouter("/api/v1/releases");
const fileParamsSchema = z.object({ id: idSchema, name: z.string().max(200, "File names are at most 200 characters") });

// GET /api/v1/releases/:id/files/:name
releaseFilesApi.get("/:id/files/:name", "public", async (req, res) => {
  const { id, name } = fileParamsSchema.parse(req.params);
  const { file, stream } = await openReleaseFile(req.user, id, name);
  const format = file.format as keyof typeof formatMediaType;
  res.set({
    "Content-Type": formatMediaType[format] ?? "application/octet-stream",
    "Content-Length": String(file.sizeBytes),
    "Content-Disposition": contentDisposition(file.name),
    // RFC 9530: the digest of the whole file, fixed at release.
    "Repr-Digest": `sha-256=:${Buffer.from(file.sha256, "hex").toString("base64")}:`,
    "Cache-Control": "public, max-age=3600",
  });
  await streamInto(
    res,
    (out) =>
      new Promise<void>((resolve, reject) => {
        stream.on("error", reject);
        out.on("error", reject);
        out.on("finish", resolve);
        stream.pipe(out);
      }),
    "release file",
  );
});

// GET /api/v1/releases/:id/verify
releaseFilesApi.get("/:id/verify", "public", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await verifyRelease(req.user, id));
});

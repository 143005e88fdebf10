import "@shared/schemas/messages";
import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";
import express, { type Express, type RequestHandler } from "express";
import helmet from "helmet";
import { toNodeHandler } from "better-auth/node";
import { sql } from "drizzle-orm";
import { auth } from "./auth";
import { db } from "./db/client";
import { env } from "./env";
import { errorHandler, notFoundHandler } from "./middleware/error-handler";
import { checkOrigin } from "./middleware/check-origin";
import { authRateLimit, SENSITIVE_AUTH_PATHS } from "./middleware/rate-limit";
import { databaseReachable } from "./middleware/database-reachable";
import { requestId } from "./middleware/request-id";
import { requestLog } from "./middleware/request-log";
import { adminApi, meApi } from "./routes/admin";
import { catalogueApi, datasetsApi, reviewApi } from "./routes/datasets";
import { deploymentsApi, platformsApi } from "./routes/platforms";
import { projectsApi } from "./routes/projects";
import { curationApi, followApi } from "./routes/curation";
import { notificationsApi } from "./routes/notifications";
import { datasetReleasesApi, releaseActionsApi, releasesApi } from "./routes/releases";
import { columnMapsApi } from "./routes/column-maps";
import { datasetUploadsApi, uploadsApi } from "./routes/uploads";
import { createTusMount } from "./uploads/tus";
import { catalogueV1Api, datasetsV1Api, releasesV1Api } from "./routes/catalogue";
import { anonymousDownloadLimit, DOWNLOAD_PATHS, downloadsApi, releaseFilesApi } from "./routes/downloads";
import { openApiApi } from "./routes/openapi";
import { tokensApi } from "./routes/tokens";
import { apiTokenAuth } from "./middleware/api-token";
import { optionalSession } from "./middleware/require-session";
import { datasetVersionsApi, projectArrayApi, projectArrayV1Api, versionsApi } from "./routes/versions";
import { exploreApi } from "./routes/explore";
import { annotationsApi, datasetAnnotationsApi } from "./routes/annotations";

export interface AppOptions {
  /** Sign-in attempts per window per IP (defaults from env). */
  authRateLimit?: number;
  /**
   * Prefix of this app's rate-limit keys (sign-in per client, anonymous downloads). The counts are shared through
   * PostgreSQL by every app with the same scope, as app servers behind a balancer should; tests that count to a
   * limit give their app a scope of its own.
   */
  rateLimitScope?: string;
  /** Serve the built client from dist/ (off in API tests). */
  serveClient?: boolean;
}

const distDir = fileURLToPath(new URL("../dist", import.meta.url));

/** Builds the Express app: middleware order, routers, error handler. Never listens. */
export function createApp(options: AppOptions = {}): Express {
  const app = express();
  app.disable("x-powered-by");
  app.set("trust proxy", process.env.TRUST_PROXY === "1" ? 1 : false);

  app.use(requestId);
  app.use(requestLog);
  const https = env.PUBLIC_URL.startsWith("https://");
  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: false,
        directives: {
          defaultSrc: ["'self'"],
          scriptSrc: ["'self'"],
          styleSrc: ["'self'", "'unsafe-inline'"],
          imgSrc: ["'self'", "data:", "blob:"],
          fontSrc: ["'self'"],
          connectSrc: ["'self'"],
          workerSrc: ["'self'", "blob:"],
          objectSrc: ["'none'"],
          frameAncestors: ["'none'"],
          baseUri: ["'self'"],
          formAction: ["'self'"],
          ...(https ? { upgradeInsecureRequests: [] } : {}),
        },
      },
      strictTransportSecurity: https,
      referrerPolicy: { policy: "strict-origin-when-cross-origin" },
    }),
  );

  app.use("/api", checkOrigin([env.PUBLIC_URL]));
  // better-auth and (later) tus read the raw request stream, so they come before the JSON body parser.
  app.use(SENSITIVE_AUTH_PATHS, authRateLimit(options.authRateLimit ?? env.AUTH_RATE_LIMIT, env.AUTH_RATE_WINDOW_S, options.rateLimitScope));
  app.all("/api/auth/{*any}", databaseReachable, toNodeHandler(auth));
  // Resumable uploads (tus) read the raw body too; GET falls through to the JSON detail route.
  app.all(["/api/uploads", "/api/uploads/{*any}"], createTusMount().handler);

  app.use(express.json({ limit: "1mb" }));
  // Scripts: a bearer token stands for its owner (read only); then anonymous downloads are rate-limited.
  app.use("/api", apiTokenAuth);
  app.use(DOWNLOAD_PATHS, optionalSession, anonymousDownloadLimit(options.rateLimitScope));

  // GET /api/health
  app.get("/api/health", (async (_req, res) => {
    try {
      await db.execute(sql`select 1`);
      res.json({ ok: true });
    } catch {
      res.status(503).json({ ok: false, error: { code: "unavailable", message: "The database is not reachable" } });
    }
  }) as RequestHandler);

  for (const api of [meApi, catalogueApi, projectsApi, platformsApi, deploymentsApi, datasetsApi, reviewApi, adminApi, curationApi, releaseActionsApi, releasesApi, datasetReleasesApi, followApi, notificationsApi, datasetUploadsApi, uploadsApi, columnMapsApi, datasetVersionsApi, versionsApi, projectArrayApi, projectArrayV1Api, exploreApi, datasetAnnotationsApi, annotationsApi, catalogueV1Api, datasetsV1Api, releasesV1Api, downloadsApi, releaseFilesApi, tokensApi, openApiApi]) {
    app.use(api.base, api.router);
  }
  app.use("/api", notFoundHandler);

  if (options.serveClient !== false && existsSync(distDir)) {
    app.use(express.static(distDir, { index: false, maxAge: "1h" }));
    app.get("/{*any}", (_req, res) => res.sendFile("index.html", { root: distDir }));
  }

  app.use(errorHandler);
  return app;
}

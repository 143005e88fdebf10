import { env } from "../env";
import { apiRouter } from "../lib/routes";
import { openApiDocument } from "../services/openapi";

export const openApiApi = apiRouter("/api/v1/openapi.json");

let cached: string | undefined;

// GET /api/v1/openapi.json
openApiApi.get("/", "public", (_req, res) => {
  // Built on first request, once every router has declared its routes.
  cached ??= JSON.stringify(openApiDocument(env.PUBLIC_URL.replace(/\/$/, "")), null, 2);
  res.type("application/json").send(cached);
});

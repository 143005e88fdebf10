import { idParamsSchema } from "@shared/schemas/common";
import { arrayDiagnosticsQuerySchema } from "@shared/schemas/versions";
import { apiRouter } from "../lib/routes";
import { arrayDiagnosticsCsv, arrayDiagnosticsCsvName, cancelVersion, createVersion, getArrayDiagnostics, getVersion, getVersionProgress, retryVersion } from "../services/versions";

export const datasetVersionsApi = apiRouter("/api/datasets");

// POST /api/datasets/:id/versions
datasetVersionsApi.post("/:id/versions", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.status(201).json(await createVersion(req.user!, id, req.body));
});

export const versionsApi = apiRouter("/api/versions");

// GET /api/versions/:id
versionsApi.get("/:id", "public", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await getVersion(req.user, id));
});

// GET /api/versions/:id/progress
versionsApi.get("/:id/progress", "public", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.set("Cache-Control", "no-store").json(await getVersionProgress(req.user, id));
});

// POST /api/versions/:id/cancel
versionsApi.post("/:id/cancel", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await cancelVersion(req.user!, id));
});

// POST /api/versions/:id/retry
versionsApi.post("/:id/retry", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await retryVersion(req.user!, id));
});

export const projectArrayApi = apiRouter("/api/projects");

// GET /api/projects/:id/array-diagnostics
projectArrayApi.get("/:id/array-diagnostics", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await getArrayDiagnostics(req.user!, id));
});

export const projectArrayV1Api = apiRouter("/api/v1/projects");

// GET /api/v1/projects/:id/array-diagnostics?format=json|csv
projectArrayV1Api.get("/:id/array-diagnostics", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  const { format } = arrayDiagnosticsQuerySchema.parse(req.query);
  const d = await getArrayDiagnostics(req.user!, id);
  if (format === "json") return void res.json(d);
  res
    .set("Content-Type", "text/csv; charset=utf-8")
    .set("Content-Disposition", `attachment; filename="${arrayDiagnosticsCsvName(d)}"`)
    .send(arrayDiagnosticsCsv(d));
});

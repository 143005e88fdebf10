import { idParamsSchema } from "@shared/schemas/common";
import { releaseInputSchema, retractInputSchema } from "@shared/schemas/curation";
import { apiRouter } from "../lib/routes";
import { getRelease, listDatasetReleases, releaseVersion, retractVersion } from "../services/releases";

export const releaseActionsApi = apiRouter("/api/versions");

// POST /api/versions/:id/release
releaseActionsApi.post("/:id/release", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.status(201).json(await releaseVersion(req.user!, id, releaseInputSchema.parse(req.body ?? {})));
});

// POST /api/versions/:id/retract
releaseActionsApi.post("/:id/retract", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await retractVersion(req.user!, id, retractInputSchema.parse(req.body ?? {})));
});

export const releasesApi = apiRouter("/api/releases");

// GET /api/releases/:id
releasesApi.get("/:id", "public", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await getRelease(req.user, id));
});

export const datasetReleasesApi = apiRouter("/api/datasets");

// GET /api/datasets/:id/releases
datasetReleasesApi.get("/:id/releases", "public", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json({ items: await listDatasetReleases(req.user, id) });
});

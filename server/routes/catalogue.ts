import { catalogueSearchSchema } from "@shared/schemas/catalogue";
import { idParamsSchema } from "@shared/schemas/common";
import { apiRouter } from "../lib/routes";
import { getLanding, searchCatalogue } from "../services/catalogue";
import { getDataset } from "../services/datasets";
import { getRelease, listDatasetReleases } from "../services/releases";

/** The public read API, versioned: catalogue, landing pages, datasets and releases. */
export const catalogueV1Api = apiRouter("/api/v1/catalogue");

// GET /api/v1/catalogue
catalogueV1Api.get("/", "public", async (req, res) => {
  res.set("Cache-Control", "no-cache");
  res.json(await searchCatalogue(catalogueSearchSchema.parse(req.query)));
});

export const datasetsV1Api = apiRouter("/api/v1/datasets");

// GET /api/v1/datasets/:id
datasetsV1Api.get("/:id", "public", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await getDataset(req.user, id));
});

// GET /api/v1/datasets/:id/landing
datasetsV1Api.get("/:id/landing", "public", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await getLanding(req.user, id));
});

// GET /api/v1/datasets/:id/releases
datasetsV1Api.get("/:id/releases", "public", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json({ items: await listDatasetReleases(req.user, id) });
});

export const releasesV1Api = apiRouter("/api/v1/releases");

// GET /api/v1/releases/:id
releasesV1Api.get("/:id", "public", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await getRelease(req.user, id));
});

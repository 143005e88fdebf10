import { idParamsSchema } from "@shared/schemas/common";
import { catalogueQuerySchema, updateDatasetInputSchema } from "@shared/schemas/datasets";
import { apiRouter } from "../lib/routes";
import { getDataset, listCatalogue, listReviewQueue, updateDataset } from "../services/datasets";

export const datasetsApi = apiRouter("/api/datasets");

// GET /api/datasets/:id
datasetsApi.get("/:id", "public", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await getDataset(req.user, id));
});

// PATCH /api/datasets/:id
datasetsApi.patch("/:id", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await updateDataset(req.user!, id, updateDatasetInputSchema.parse(req.body)));
});

export const catalogueApi = apiRouter("/api/catalogue");

// GET /api/catalogue
catalogueApi.get("/", "public", async (req, res) => {
  res.json({ items: await listCatalogue(catalogueQuerySchema.parse(req.query)) });
});

export const reviewApi = apiRouter("/api/review-queue");

// GET /api/review-queue
reviewApi.get("/", "session", async (req, res) => {
  res.json({ items: await listReviewQueue(req.user!) });
});

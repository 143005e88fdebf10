import { idParamsSchema } from "@shared/schemas/common";
import { previewQuerySchema } from "@shared/schemas/uploads";
import { apiRouter } from "../lib/routes";
import { getUploadDetail, listDatasetUploads } from "../services/uploads";

export const datasetUploadsApi = apiRouter("/api/datasets");

// GET /api/datasets/:id/uploads
datasetUploadsApi.get("/:id/uploads", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await listDatasetUploads(req.user, id));
});

export const uploadsApi = apiRouter("/api/uploads");

// GET /api/uploads/:id (tus handles the other methods on this path; see server/uploads/tus.ts)
uploadsApi.get("/:id", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await getUploadDetail(req.user, id, previewQuerySchema.parse(req.query)));
});

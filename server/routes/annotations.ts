import { idParamsSchema } from "@shared/schemas/common";
import { apiRouter } from "../lib/routes";
import { createAnnotation, deleteAnnotation, listAnnotations, updateAnnotation } from "../services/annotations";

export const datasetAnnotationsApi = apiRouter("/api/datasets");

// GET /api/datasets/:id/annotations
datasetAnnotationsApi.get("/:id/annotations", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await listAnnotations(req.user!, id));
});

// POST /api/datasets/:id/annotations
datasetAnnotationsApi.post("/:id/annotations", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.status(201).json(await createAnnotation(req.user!, id, req.body));
});

export const annotationsApi = apiRouter("/api/annotations");

// PATCH /api/annotations/:id
annotationsApi.patch("/:id", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await updateAnnotation(req.user!, id, req.body));
});

// DELETE /api/annotations/:id
annotationsApi.delete("/:id", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await deleteAnnotation(req.user!, id));
});

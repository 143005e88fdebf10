import { idParamsSchema } from "@shared/schemas/common";
import { createColumnMapInputSchema } from "@shared/schemas/uploads";
import { apiRouter } from "../lib/routes";
import { createColumnMap, listColumnMaps } from "../services/column-maps";

export const columnMapsApi = apiRouter("/api/platforms");

// GET /api/platforms/:id/column-maps
columnMapsApi.get("/:id/column-maps", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json({ items: await listColumnMaps(req.user!, id) });
});

// POST /api/platforms/:id/column-maps
columnMapsApi.post("/:id/column-maps", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.status(201).json(await createColumnMap(req.user!, id, createColumnMapInputSchema.parse(req.body)));
});

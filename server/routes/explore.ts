import { idParamsSchema } from "@shared/schemas/common";
import { apiRouter } from "../lib/routes";
import { getPlotWindow, getQcReport, getRecordsPage, getTrack } from "../services/explore";

/** Reading a version's records: same access as GET /api/versions/:id (public once released). */
export const exploreApi = apiRouter("/api/versions");

// GET /api/versions/:id/plot
exploreApi.get("/:id/plot", "public", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await getPlotWindow(req.user, id, req.query));
});

// GET /api/versions/:id/records
exploreApi.get("/:id/records", "public", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await getRecordsPage(req.user, id, req.query));
});

// GET /api/versions/:id/qc-report
exploreApi.get("/:id/qc-report", "public", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await getQcReport(req.user, id));
});

// GET /api/versions/:id/track
exploreApi.get("/:id/track", "public", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await getTrack(req.user, id));
});

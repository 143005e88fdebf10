import { idParamsSchema } from "@shared/schemas/common";
import { createDeploymentInputSchema, updateDeploymentInputSchema, updatePlatformInputSchema } from "@shared/schemas/platforms";
import { updateDeploymentQcSettingsInputSchema } from "@shared/schemas/qc-settings";
import { apiRouter } from "../lib/routes";
import {
  createDeployment,
  getDeployment,
  getDeploymentQcSettings,
  getPlatform,
  listDeployments,
  updateDeployment,
  updateDeploymentQcSettings,
  updatePlatform,
} from "../services/platforms";

export const platformsApi = apiRouter("/api/platforms");

// GET /api/platforms/:id
platformsApi.get("/:id", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await getPlatform(req.user!, id));
});

// PATCH /api/platforms/:id
platformsApi.patch("/:id", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await updatePlatform(req.user!, id, updatePlatformInputSchema.parse(req.body)));
});

// GET /api/platforms/:id/deployments
platformsApi.get("/:id/deployments", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json({ items: await listDeployments(req.user!, id) });
});

// POST /api/platforms/:id/deployments
platformsApi.post("/:id/deployments", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.status(201).json(await createDeployment(req.user!, id, createDeploymentInputSchema.parse(req.body)));
});

export const deploymentsApi = apiRouter("/api/deployments");

// GET /api/deployments/:id
deploymentsApi.get("/:id", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await getDeployment(req.user!, id));
});

// PATCH /api/deployments/:id
deploymentsApi.patch("/:id", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await updateDeployment(req.user!, id, updateDeploymentInputSchema.parse(req.body)));
});

// GET /api/deployments/:id/qc-settings
deploymentsApi.get("/:id/qc-settings", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await getDeploymentQcSettings(req.user!, id));
});

// PATCH /api/deployments/:id/qc-settings — replaces the overrides ({} = defaults)
deploymentsApi.patch("/:id/qc-settings", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await updateDeploymentQcSettings(req.user!, id, updateDeploymentQcSettingsInputSchema.parse(req.body)));
});

import { idParamsSchema, idSchema } from "@shared/schemas/common";
import { addMemberInputSchema, createProjectInputSchema, updateProjectInputSchema } from "@shared/schemas/projects";
import { createPlatformInputSchema } from "@shared/schemas/platforms";
import { createDatasetInputSchema } from "@shared/schemas/datasets";
import { z } from "zod";
import { apiRouter } from "../lib/routes";
import { addMember, createProject, getProject, listMembers, listProjects, removeMember, updateProject } from "../services/projects";
import { createPlatform, listPlatforms } from "../services/platforms";
import { createDataset, listDatasets } from "../services/datasets";

export const projectsApi = apiRouter("/api/projects");
const r = projectsApi;

// GET /api/projects
r.get("/", "session", async (req, res) => {
  res.json({ items: await listProjects(req.user!) });
});

// POST /api/projects
r.post("/", "admin", async (req, res) => {
  res.status(201).json(await createProject(req.user!, createProjectInputSchema.parse(req.body)));
});

// GET /api/projects/:id
r.get("/:id", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await getProject(req.user!, id));
});

// PATCH /api/projects/:id
r.patch("/:id", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await updateProject(req.user!, id, updateProjectInputSchema.parse(req.body)));
});

// GET /api/projects/:id/members
r.get("/:id/members", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json({ items: await listMembers(req.user!, id) });
});

// POST /api/projects/:id/members
r.post("/:id/members", "admin", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.status(201).json(await addMember(req.user!, id, addMemberInputSchema.parse(req.body)));
});

// DELETE /api/projects/:id/members/:userId
r.delete("/:id/members/:userId", "admin", async (req, res) => {
  const { id, userId } = z.object({ id: idSchema, userId: z.string().min(1).max(100) }).parse(req.params);
  await removeMember(req.user!, id, userId);
  res.status(204).end();
});

// GET /api/projects/:id/platforms
r.get("/:id/platforms", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json({ items: await listPlatforms(req.user!, id) });
});

// POST /api/projects/:id/platforms
r.post("/:id/platforms", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.status(201).json(await createPlatform(req.user!, id, createPlatformInputSchema.parse(req.body)));
});

// GET /api/projects/:id/datasets
r.get("/:id/datasets", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json({ items: await listDatasets(req.user!, id) });
});

// POST /api/projects/:id/datasets
r.post("/:id/datasets", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.status(201).json(await createDataset(req.user!, id, createDatasetInputSchema.parse(req.body)));
});

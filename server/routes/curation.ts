import { idParamsSchema } from "@shared/schemas/common";
import { approveInputSchema, commentInputSchema, reasonInputSchema, submitInputSchema } from "@shared/schemas/curation";
import { apiRouter } from "../lib/routes";
import { addComment, followDataset, getFollow, listComments, unfollowDataset } from "../services/comments";
import { approveVersion, compareVersion, getVersionReview, rejectVersion, requestChanges, submitVersion } from "../services/curation";

export const curationApi = apiRouter("/api/versions");
const r = curationApi;

// GET /api/versions/:id/review
r.get("/:id/review", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await getVersionReview(req.user!, id));
});

// GET /api/versions/:id/compare
r.get("/:id/compare", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await compareVersion(req.user!, id));
});

// POST /api/versions/:id/submit
r.post("/:id/submit", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await submitVersion(req.user!, id, submitInputSchema.parse(req.body ?? {})));
});

// POST /api/versions/:id/approve
r.post("/:id/approve", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await approveVersion(req.user!, id, approveInputSchema.parse(req.body ?? {})));
});

// POST /api/versions/:id/reject
r.post("/:id/reject", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await rejectVersion(req.user!, id, reasonInputSchema.parse(req.body ?? {})));
});

// POST /api/versions/:id/request-changes
r.post("/:id/request-changes", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await requestChanges(req.user!, id, reasonInputSchema.parse(req.body ?? {})));
});

// GET /api/versions/:id/comments
r.get("/:id/comments", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json({ items: await listComments(req.user!, id) });
});

// POST /api/versions/:id/comments
r.post("/:id/comments", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.status(201).json(await addComment(req.user!, id, commentInputSchema.parse(req.body ?? {})));
});

export const followApi = apiRouter("/api/datasets");

// GET /api/datasets/:id/follow
followApi.get("/:id/follow", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await getFollow(req.user!, id));
});

// POST /api/datasets/:id/follow
followApi.post("/:id/follow", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await followDataset(req.user!, id));
});

// DELETE /api/datasets/:id/follow
followApi.delete("/:id/follow", "session", async (req, res) => {
  const { id } = idParamsSchema.parse(req.params);
  res.json(await unfollowDataset(req.user!, id));
});

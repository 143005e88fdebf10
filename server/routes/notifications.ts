import { markReadInputSchema } from "@shared/schemas/curation";
import { apiRouter } from "../lib/routes";
import { listNotifications, markNotificationsRead } from "../services/notifications";

export const notificationsApi = apiRouter("/api/notifications");

// GET /api/notifications
notificationsApi.get("/", "session", async (req, res) => {
  res.json(await listNotifications(req.user!));
});

// POST /api/notifications/read
notificationsApi.post("/read", "session", async (req, res) => {
  res.json(await markNotificationsRead(req.user!, markReadInputSchema.parse(req.body ?? {})));
});

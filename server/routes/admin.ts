import { z } from "zod";
import { setAdminInputSchema } from "@shared/schemas/users";
import { apiRouter } from "../lib/routes";
import { getMe, listMail, listUsers, setAdmin } from "../services/admin";

export const meApi = apiRouter("/api/me");

// GET /api/me
meApi.get("/", "session", async (req, res) => {
  res.json(await getMe(req.user!));
});

export const adminApi = apiRouter("/api/admin");

// GET /api/admin/users
adminApi.get("/users", "admin", async (_req, res) => {
  res.json({ items: await listUsers() });
});

// PATCH /api/admin/users/:id
adminApi.patch("/users/:id", "admin", async (req, res) => {
  const { id } = z.object({ id: z.string().min(1).max(100) }).parse(req.params);
  res.json(await setAdmin(req.user!, id, setAdminInputSchema.parse(req.body).isAdmin));
});

// GET /api/admin/mail
adminApi.get("/mail", "admin", async (_req, res) => {
  res.json({ items: await listMail() });
});

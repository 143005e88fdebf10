import { z } from "zod";
import { projectRoles } from "./projects";

/** Password rules shared by sign-up, reset and the server (SECURITY.md: at least 12 characters). */
export const passwordSchema = z
  .string()
  .min(12, "Use at least 12 characters")
  .max(128, "At most 128 characters");

export const meSchema = z.object({
  user: z.object({
    id: z.string(),
    name: z.string(),
    email: z.string(),
    emailVerified: z.boolean(),
    isAdmin: z.boolean(),
  }),
  memberships: z.array(z.object({ projectId: z.string(), projectName: z.string(), role: z.enum(projectRoles) })),
});
export type Me = z.infer<typeof meSchema>;

export const adminUserSchema = z.object({
  id: z.string(),
  name: z.string(),
  email: z.string(),
  emailVerified: z.boolean(),
  isAdmin: z.boolean(),
  createdAt: z.string(),
  memberships: z.array(z.object({ projectId: z.string(), projectName: z.string(), role: z.enum(projectRoles) })),
});
export type AdminUser = z.infer<typeof adminUserSchema>;

export const setAdminInputSchema = z.object({ isAdmin: z.boolean({ message: "isAdmin must be true or false" }) });

export const mailMessageSchema = z.object({
  id: z.string(),
  from: z.string(),
  to: z.array(z.string()),
  subject: z.string(),
  text: z.string(),
  receivedAt: z.string(),
});
export type MailMessage = z.infer<typeof mailMessageSchema>;

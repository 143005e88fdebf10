import { z } from "zod";
import { clearableText, idSchema, optionalText } from "./common";

export const projectRoles = ["contributor", "curator"] as const;
export type ProjectRole = (typeof projectRoles)[number];

export const createProjectInputSchema = z.object({
  name: z.string().trim().min(3, "Name needs at least 3 characters").max(120, "At most 120 characters"),
  slug: z
    .string()
    .trim()
    .min(2, "Short name needs at least 2 characters")
    .max(40, "At most 40 characters")
    .regex(/^[a-z0-9]+(-[a-z0-9]+)*$/, "Lower-case letters, digits and single hyphens only"),
  description: optionalText(4000),
});
export type CreateProjectInput = z.infer<typeof createProjectInputSchema>;
/** Edits: fields left out stay; a blank description clears it. */
export const updateProjectInputSchema = z.object({
  name: createProjectInputSchema.shape.name.optional(),
  slug: createProjectInputSchema.shape.slug.optional(),
  description: clearableText(4000),
});
export type UpdateProjectInput = z.infer<typeof updateProjectInputSchema>;

export const projectSchema = z.object({
  id: idSchema,
  name: z.string(),
  slug: z.string(),
  description: z.string().nullable(),
  createdAt: z.string(),
  /** The caller's role in this project, or null (admin or visitor). */
  myRole: z.enum(projectRoles).nullable(),
  counts: z.object({ platforms: z.number(), datasets: z.number(), members: z.number() }).optional(),
});
export type Project = z.infer<typeof projectSchema>;

export const addMemberInputSchema = z.object({
  email: z.email("Enter a valid e-mail address"),
  role: z.enum(projectRoles, { message: "Role must be contributor or curator" }),
});
export type AddMemberInput = z.infer<typeof addMemberInputSchema>;

export const memberSchema = z.object({
  userId: z.string(),
  name: z.string(),
  email: z.string(),
  role: z.enum(projectRoles),
  since: z.string(),
});
export type Member = z.infer<typeof memberSchema>;

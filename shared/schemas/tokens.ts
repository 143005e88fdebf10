import { z } from "zod";
import { idSchema } from "./common";

/**
 * What a personal API token may do. read: list and download (released data, and drafts of the owner's
 * projects); upload: the same, plus resumable uploads to datasets the owner may contribute to.
 */
export const apiTokenScopes = ["read", "upload"] as const;
export type ApiTokenScope = (typeof apiTokenScopes)[number];

export const createApiTokenInputSchema = z.object({
  name: z.string({ message: "Name the token" }).trim().min(1, "Name the token, e.g. the script that uses it").max(100, "At most 100 characters"),
  scope: z.enum(apiTokenScopes, { message: "scope must be read or upload" }),
  /** Days until the token stops working; omit for no end date. */
  expiresInDays: z.number().int("Whole days only").min(1, "At least 1 day").max(3650, "At most 3650 days").optional(),
});
export type CreateApiTokenInput = z.infer<typeof createApiTokenInputSchema>;

export const apiTokenSchema = z.object({
  id: idSchema,
  name: z.string(),
  scope: z.enum(apiTokenScopes),
  /** The first characters of the secret, so people can tell their tokens apart. */
  prefix: z.string(),
  createdAt: z.string(),
  lastUsedAt: z.string().nullable(),
  expiresAt: z.string().nullable(),
  revokedAt: z.string().nullable(),
});
export type ApiToken = z.infer<typeof apiTokenSchema>;

/** The answer to creating a token: the only time the secret is shown. */
export const createdApiTokenSchema = apiTokenSchema.extend({ token: z.string() });
export type CreatedApiToken = z.infer<typeof createdApiTokenSchema>;

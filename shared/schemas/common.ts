import { z } from "zod";

export const idSchema = z.uuid({ message: "Must be a valid id" });
export const idParamsSchema = z.object({ id: idSchema });

/** ISO 8601 instant with an explicit zone (Z or offset). */
export const isoInstantSchema = z.iso.datetime({ offset: true, message: "Use an ISO 8601 time with a zone, e.g. 2026-03-05T12:00:00Z" });

/** Optional text from a form: empty string becomes undefined. */
export const optionalText = (max: number) =>
  z.preprocess((v) => (typeof v === "string" && v.trim() === "" ? undefined : v), z.string().trim().max(max, `At most ${max} characters`).optional());

/** Optional number from a form: empty string / null becomes undefined. */
export const optionalNumber = <T extends z.ZodType>(inner: T) =>
  z.preprocess((v) => (v === "" || v === null || (typeof v === "number" && Number.isNaN(v)) ? undefined : v), inner.optional());

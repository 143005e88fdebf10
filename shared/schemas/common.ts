import { z } from "zod";
import "./messages";

export const idSchema = z.uuid({ message: "Must be a valid id" });
export const idParamsSchema = z.object({ id: idSchema });

/** ISO 8601 instant with an explicit zone (Z or offset). */
export const isoInstantSchema = z.iso.datetime({ offset: true, message: "Use an ISO 8601 time with a zone, e.g. 2026-03-05T12:00:00Z" });

/** Optional text from a form: blank becomes undefined. */
export const optionalText = (max: number) =>
  z
    .string()
    .trim()
    .max(max, `At most ${max} characters`)
    .optional()
    .transform((v) => (v === "" ? undefined : v));

/** An optional value whose blank form ("" from an empty input) means "not given". */
export const blankable = <T extends z.ZodType<string>>(inner: T) =>
  z
    .union([z.literal(""), inner])
    .optional()
    .transform((v) => (v === "" ? undefined : (v as z.output<T> | undefined)));

/** Optional number from a form: null or NaN (an empty number input) becomes undefined. */
export const optionalNumber = <T extends z.ZodType<number>>(inner: T) =>
  z
    .union([inner, z.nan(), z.null()])
    .optional()
    .transform((v) => (v === null || v === undefined || Number.isNaN(v) ? undefined : (v as z.output<T>)));

/*
 * For edits (PATCH): a field left out stays as it is; a blank one ("", null, or NaN from an empty number input)
 * clears the stored value (null).
 */

/** Editable optional text: absent = unchanged, blank or null = cleared. */
export const clearableText = (max: number) =>
  z
    .union([z.null(), z.string().trim().max(max, `At most ${max} characters`)])
    .optional()
    .transform((v) => (v === undefined ? undefined : v === null || v === "" ? null : v));

/** Editable optional value checked by `inner`: absent = unchanged, "" or null = cleared. */
export const clearable = <T extends z.ZodType<string>>(inner: T) =>
  z
    .union([z.literal(""), z.null(), inner])
    .optional()
    .transform((v) => (v === undefined ? undefined : v === "" || v === null ? null : (v as z.output<T>)));

/** Editable optional number: absent = unchanged, null or NaN = cleared. */
export const clearableNumber = <T extends z.ZodType<number>>(inner: T) =>
  z
    .union([inner, z.nan(), z.null()])
    .optional()
    .transform((v) => (v === undefined ? undefined : v === null || Number.isNaN(v) ? null : (v as z.output<T>)));

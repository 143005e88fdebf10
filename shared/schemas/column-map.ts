import { z } from "zod";
import { allowedUnits, inputVariableNames, isAllowedUnit, resolveVariable, vocabulary } from "../vocabulary";

/**
 * How a delimited logger file maps to Tauline's canonical variables. Shared by the upload screens, the worker and
 * the command-line check. Columns are named by header text, or by 1-based position when the file has no header.
 */

const columnRef = z.union([z.string().min(1), z.number().int().min(1)]);

export const timeFormats = ["iso8601", "epoch_seconds", "epoch_milliseconds"] as const;

export const columnMappingSchema = z.object({
  column: columnRef,
  /** CF standard name of the variable (see shared/vocabulary.ts for the list and aliases). */
  variable: z.string().min(1),
  /** UDUNITS unit the column is written in, e.g. "knot", "hPa", "degC", "percent". */
  unit: z.string().min(1),
  /** For bearings: which way the bearing points. Must agree with the variable's name when given. */
  convention: z.enum(["from", "to"]).optional(),
  /** For bearings: compass (magnetic) bearings are turned to true with the declination, east positive. */
  reference: z.enum(["true", "magnetic"]).default("true"),
  declinationDeg: z.number().min(-180).max(180).default(0),
});
export type ColumnMapping = z.infer<typeof columnMappingSchema>;

export const columnMapSchema = z
  .object({
    version: z.literal(1).default(1),
    delimiter: z.string().length(1).default(","),
    decimalMark: z.enum([".", ","]).default("."),
    /** 1-based line of the header; 0 when the file has none. */
    headerRow: z.number().int().min(0).default(1),
    /** Lines to skip after the header (e.g. a units line). */
    skipRows: z.number().int().min(0).default(0),
    /** Field texts that mean "no value" (compared after trimming). */
    missingValues: z.array(z.string()).default(["", "NaN", "nan", "NA", "-999", "-9999"]),
    time: z.object({
      /** One column, or a date column then a time-of-day column (joined with "T"). */
      columns: z.array(columnRef).min(1).max(2),
      /**
       * "iso8601" (YYYY-MM-DDThh:mm[:ss[.fff]] with Z or ±hh:mm), "epoch_seconds", "epoch_milliseconds", or a
       * pattern built from YYYY MM DD hh mm ss (e.g. "DD/MM/YYYY hh:mm:ss").
       */
      format: z.string().min(1).default("iso8601"),
      /** Zone for times written without one: "UTC" or a fixed offset "+hh:mm"/"-hh:mm". Without it such a time is a syntax error. */
      zone: z
        .string()
        .regex(/^(UTC|Z|[+-]\d{2}:\d{2})$/, "Use UTC or a fixed offset such as +02:00")
        .nullable()
        .default(null),
    }),
    /** Column holding a platform id, for files with several drifters or moorings. */
    platformColumn: columnRef.optional(),
    columns: z.array(columnMappingSchema).min(1),
  })
  .superRefine((map, ctx) => {
    const seen = new Map<string, number>();
    map.columns.forEach((c, i) => {
      const resolved = resolveVariable(c.variable);
      if (!resolved) {
        ctx.addIssue({ code: "custom", path: ["columns", i, "variable"], message: `Unknown variable "${c.variable}" for column ${c.column}; use a CF standard name such as ${inputVariableNames.slice(2, 5).join(", ")}` });
        return;
      }
      const canonical = resolved.canonical;
      if (!isAllowedUnit(canonical, c.unit)) {
        ctx.addIssue({ code: "custom", path: ["columns", i, "unit"], message: `Unit "${c.unit}" is not allowed for ${c.variable} (column ${c.column}); allowed: ${allowedUnits(canonical).join(", ")}` });
      }
      const conv = vocabulary[canonical].convention;
      if (c.convention !== undefined) {
        const declared = resolved.turn180 ? (conv === "from" ? "to" : "from") : conv;
        if (declared === undefined || declared !== c.convention) {
          ctx.addIssue({ code: "custom", path: ["columns", i, "convention"], message: `Column ${c.column}: convention "${c.convention}" does not match variable ${c.variable}` });
        }
      }
      const prev = seen.get(canonical);
      if (prev !== undefined) {
        ctx.addIssue({ code: "custom", path: ["columns", i, "variable"], message: `Columns ${map.columns[prev]!.column} and ${c.column} both map to ${canonical}` });
      } else seen.set(canonical, i);
    });
  });
export type ColumnMap = z.infer<typeof columnMapSchema>;
export type ColumnMapInput = z.input<typeof columnMapSchema>;

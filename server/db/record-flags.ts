/**
 * Where each variable's QC flag lives in a record. Records keep every flag in one `bytea`, `flags`: byte i is the flag
 * of FLAG_ORDER[i] (1 pass, 2 not evaluated, 3 suspect, 4 fail, 9 missing; 0 = the build had no such variable). One
 * field instead of one smallint column per variable spares PostgreSQL ~40 field conversions per row on a build's COPY
 * (DEVELOPERS.md, "Packed flags"). SQL reads a flag with `record_flag(flags, i)` (drizzle/0014_records_packed_flags.sql):
 * a smallint, NULL where the byte is 0 or beyond the row's bytes, so readers see what a smallint column would hold.
 *
 * The order is part of the stored data: a new variable is appended at the end, never inserted or reordered
 * (tests/unit/server/db/record-flags.test.ts holds the vocabulary to that).
 */
import { derivedVariables, measuredVariables } from "../../shared/vocabulary";

export const FLAG_ORDER: readonly string[] = [
  "latitude",
  "longitude",
  "wind_speed",
  "wind_from_direction",
  "eastward_wind",
  "northward_wind",
  "wind_speed_of_gust",
  "air_temperature",
  "air_pressure",
  "air_pressure_at_mean_sea_level",
  "relative_humidity",
  "sea_surface_temperature",
  "sea_water_temperature",
  "sea_water_practical_salinity",
  "eastward_sea_water_velocity",
  "northward_sea_water_velocity",
  "sea_water_speed",
  "sea_water_velocity_to_direction",
  "wind_speed_10m_neutral",
  "eastward_wind_10m_neutral",
  "northward_wind_10m_neutral",
  "surface_drag_coefficient_for_momentum_in_air",
  "air_density",
  "surface_downward_eastward_stress",
  "surface_downward_northward_stress",
  "magnitude_of_surface_downward_stress",
  "coriolis_parameter",
  "beta_parameter",
  "ekman_transport_eastward",
  "ekman_transport_northward",
  "ekman_depth_empirical",
  "ekman_depth_theoretical",
  "eastward_sea_water_velocity_due_to_ekman_drift",
  "northward_sea_water_velocity_due_to_ekman_drift",
  "coastal_upwelling_index",
  "surface_eastward_sea_water_velocity",
  "surface_northward_sea_water_velocity",
  "platform_speed_wrt_ground",
  "current_wind_angle",
  "current_wind_ratio",
];

/** Every record variable (value column) in vocabulary order. */
export const recordVariables: readonly string[] = [...measuredVariables, ...derivedVariables];

const positions = new Map(FLAG_ORDER.map((v, i) => [v, i]));

/** The byte of `variable`'s flag in `flags`. */
export function flagIndex(variable: string): number {
  const i = positions.get(variable);
  if (i === undefined) throw new Error(`no flag position for ${variable}: append it to FLAG_ORDER`);
  return i;
}

/** SQL for the flag of `variable` (smallint or NULL); `row` qualifies the column, e.g. "r.". */
export const flagSql = (variable: string, row = "") => `record_flag(${row}flags, ${flagIndex(variable)})`;

/**
 * SQL for `flags` with the given variables' bytes replaced by SQL smallint expressions (NULL keeps the byte).
 * Rows are always written FLAG_ORDER.length bytes long, so every position a variable has exists in them.
 */
export function setFlagsSql(changes: { variable: string; value: string }[], row = ""): string {
  let out = `${row}flags`;
  for (const c of changes) {
    const i = flagIndex(c.variable);
    out = `set_byte(${out}, ${i}, coalesce((${c.value})::int, get_byte(${row}flags, ${i})))`;
  }
  return out;
}

/** The `flags` bytes of one record with the given flags (variables not named, or null, hold 0 = none). */
export function packFlags(flags: Readonly<Record<string, number | null | undefined>>): Buffer {
  const b = Buffer.alloc(FLAG_ORDER.length);
  for (const [v, f] of Object.entries(flags)) if (f !== null && f !== undefined) b[flagIndex(v)] = f;
  return b;
}

/** SQL selecting a value column, or `<variable>_qc` (that variable's flag), under that name. */
export function columnSql(name: string, row = ""): string {
  const base = name.endsWith("_qc") ? name.slice(0, -3) : null;
  return base !== null && positions.has(base) ? `${flagSql(base, row)} as "${name}"` : `${row}"${name.replace(/"/g, "")}"`;
}

import type { Dimension } from "./units";
import { findUnit, unitsByDimension } from "./units";

/**
 * Canonical measured variables, keyed by CF standard name (CF standard-name table v83).
 * Values are held in the canonical unit; `allowedUnits` are what a column map may declare.
 */
export const measuredVariables = [
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
] as const;
export type MeasuredVariable = (typeof measuredVariables)[number];

export interface VariableDef {
  readonly name: MeasuredVariable;
  readonly label: string;
  readonly dimension: Dimension;
  readonly canonicalUnit: string;
  /** For directions: which way the bearing points (CF: wind "from", currents "to"). */
  readonly convention?: "from" | "to";
}

const v = (name: MeasuredVariable, label: string, dimension: Dimension, canonicalUnit: string, convention?: "from" | "to"): VariableDef => ({
  name,
  label,
  dimension,
  canonicalUnit,
  convention,
});

export const vocabulary: Readonly<Record<MeasuredVariable, VariableDef>> = {
  latitude: v("latitude", "Latitude", "latitude", "degree_north"),
  longitude: v("longitude", "Longitude", "longitude", "degree_east"),
  wind_speed: v("wind_speed", "Wind speed", "speed", "m s-1"),
  wind_from_direction: v("wind_from_direction", "Wind direction (from)", "angle", "degree", "from"),
  eastward_wind: v("eastward_wind", "Eastward wind", "speed", "m s-1"),
  northward_wind: v("northward_wind", "Northward wind", "speed", "m s-1"),
  wind_speed_of_gust: v("wind_speed_of_gust", "Gust speed", "speed", "m s-1"),
  air_temperature: v("air_temperature", "Air temperature", "temperature", "K"),
  air_pressure: v("air_pressure", "Air pressure at the sensor", "pressure", "Pa"),
  air_pressure_at_mean_sea_level: v("air_pressure_at_mean_sea_level", "Sea-level air pressure", "pressure", "Pa"),
  relative_humidity: v("relative_humidity", "Relative humidity", "fraction", "1"),
  sea_surface_temperature: v("sea_surface_temperature", "Sea-surface temperature", "temperature", "K"),
  sea_water_temperature: v("sea_water_temperature", "Water temperature", "temperature", "K"),
  sea_water_practical_salinity: v("sea_water_practical_salinity", "Practical salinity", "salinity", "1"),
  eastward_sea_water_velocity: v("eastward_sea_water_velocity", "Eastward current", "speed", "m s-1"),
  northward_sea_water_velocity: v("northward_sea_water_velocity", "Northward current", "speed", "m s-1"),
  sea_water_speed: v("sea_water_speed", "Current speed", "speed", "m s-1"),
  sea_water_velocity_to_direction: v("sea_water_velocity_to_direction", "Current direction (to)", "angle", "degree", "to"),
};

/**
 * Names a column map may use for a column: the canonical ones plus CF names that Tauline folds into a canonical
 * variable (a bearing turned by 180°, or an alias from the CF table).
 */
export const inputVariableAliases: Readonly<Record<string, { canonical: MeasuredVariable; turn180: boolean }>> = {
  wind_to_direction: { canonical: "wind_from_direction", turn180: true },
  direction_of_sea_water_velocity: { canonical: "sea_water_velocity_to_direction", turn180: false },
  sea_water_velocity_from_direction: { canonical: "sea_water_velocity_to_direction", turn180: true },
  air_pressure_at_sea_level: { canonical: "air_pressure_at_mean_sea_level", turn180: false },
};

/** Every name a column map may declare as a variable. */
export const inputVariableNames: readonly string[] = [...measuredVariables, ...Object.keys(inputVariableAliases)];

/** Resolves a declared variable name to its canonical variable, or undefined when Tauline does not know it. */
export function resolveVariable(name: string): { canonical: MeasuredVariable; turn180: boolean } | undefined {
  if ((measuredVariables as readonly string[]).includes(name)) return { canonical: name as MeasuredVariable, turn180: false };
  return inputVariableAliases[name];
}

/** The units a column of this variable may declare (UDUNITS spellings). */
export function allowedUnits(variable: MeasuredVariable): string[] {
  return unitsByDimension[vocabulary[variable].dimension].map((u) => u.unit);
}

/** True when `unit` (or a known spelling of it) is allowed for `variable`. */
export function isAllowedUnit(variable: MeasuredVariable, unit: string): boolean {
  return findUnit(vocabulary[variable].dimension, unit) !== undefined;
}

/** A derived per-record output: its column name, CF standard name where one exists, long name and unit. */
export interface DerivedDef {
  readonly name: string;
  readonly standardName?: string;
  readonly longName: string;
  readonly unit: string;
}

const d = (name: string, longName: string, unit: string, standardName?: string): DerivedDef => ({ name, longName, unit, standardName });

/**
 * Derived outputs. Where CF has no exact name (Ekman transport, depth, upwelling index, the neutral 10 m wind as
 * such) the column name is Tauline's documented name and no standard name is claimed (DOMAIN §12).
 */
export const derivedVocabulary = {
  wind_speed_10m_neutral: d("wind_speed_10m_neutral", "Equivalent-neutral wind speed at 10 m", "m s-1", "wind_speed"),
  eastward_wind_10m_neutral: d("eastward_wind_10m_neutral", "Equivalent-neutral eastward wind at 10 m", "m s-1", "eastward_wind"),
  northward_wind_10m_neutral: d("northward_wind_10m_neutral", "Equivalent-neutral northward wind at 10 m", "m s-1", "northward_wind"),
  surface_drag_coefficient_for_momentum_in_air: d("surface_drag_coefficient_for_momentum_in_air", "Neutral 10 m drag coefficient", "1", "surface_drag_coefficient_for_momentum_in_air"),
  air_density: d("air_density", "Air density", "kg m-3", "air_density"),
  surface_downward_eastward_stress: d("surface_downward_eastward_stress", "Eastward wind stress", "Pa", "surface_downward_eastward_stress"),
  surface_downward_northward_stress: d("surface_downward_northward_stress", "Northward wind stress", "Pa", "surface_downward_northward_stress"),
  magnitude_of_surface_downward_stress: d("magnitude_of_surface_downward_stress", "Wind stress magnitude", "Pa", "magnitude_of_surface_downward_stress"),
  coriolis_parameter: d("coriolis_parameter", "Coriolis parameter", "s-1", "coriolis_parameter"),
  beta_parameter: d("beta_parameter", "Meridional gradient of the Coriolis parameter (beta)", "m-1 s-1"),
  ekman_transport_eastward: d("ekman_transport_eastward", "Eastward Ekman volume transport per unit width", "m2 s-1"),
  ekman_transport_northward: d("ekman_transport_northward", "Northward Ekman volume transport per unit width", "m2 s-1"),
  ekman_depth_empirical: d("ekman_depth_empirical", "Ekman depth, empirical (7.6·U10/√sin|φ|)", "m"),
  ekman_depth_theoretical: d("ekman_depth_theoretical", "Ekman depth, constant eddy viscosity", "m"),
  eastward_sea_water_velocity_due_to_ekman_drift: d("eastward_sea_water_velocity_due_to_ekman_drift", "Eastward surface Ekman current (theory)", "m s-1", "eastward_sea_water_velocity_due_to_ekman_drift"),
  northward_sea_water_velocity_due_to_ekman_drift: d("northward_sea_water_velocity_due_to_ekman_drift", "Northward surface Ekman current (theory)", "m s-1", "northward_sea_water_velocity_due_to_ekman_drift"),
  coastal_upwelling_index: d("coastal_upwelling_index", "Coastal upwelling index (offshore Ekman transport per 100 m of coast)", "m3 s-1 per 100 m"),
  surface_eastward_sea_water_velocity: d("surface_eastward_sea_water_velocity", "Drifter eastward velocity from positions", "m s-1", "surface_eastward_sea_water_velocity"),
  surface_northward_sea_water_velocity: d("surface_northward_sea_water_velocity", "Drifter northward velocity from positions", "m s-1", "surface_northward_sea_water_velocity"),
  platform_speed_wrt_ground: d("platform_speed_wrt_ground", "Drifter speed from positions", "m s-1", "platform_speed_wrt_ground"),
  current_wind_angle: d("current_wind_angle", "Angle from the wind's heading to the current's, positive clockwise", "degree"),
  current_wind_ratio: d("current_wind_ratio", "Current speed over 10 m wind speed", "1"),
} as const satisfies Record<string, DerivedDef>;
export type DerivedVariable = keyof typeof derivedVocabulary;
export const derivedVariables = Object.keys(derivedVocabulary) as DerivedVariable[];

/**
 * UDUNITS unit strings Tauline accepts, grouped by dimension, each with a linear conversion to the
 * dimension's canonical unit: canonical = value·scale + offset.
 * Sources: 1 kn = 1852 m/h (definition); 1 hPa = 1 mbar = 100 Pa; K = degC + 273.15; degF by definition.
 */
export type Dimension = "speed" | "pressure" | "temperature" | "fraction" | "angle" | "latitude" | "longitude" | "salinity" | "length";

export interface UnitDef {
  /** UDUNITS spelling used in files and exports. */
  readonly unit: string;
  readonly scale: number;
  readonly offset: number;
}

const lin = (unit: string, scale: number, offset = 0): UnitDef => ({ unit, scale, offset });

/** Metres per second in one international knot (1852 m per hour, by definition). */
export const KNOT_IN_M_S = 1852 / 3600;

export const unitsByDimension: Readonly<Record<Dimension, readonly UnitDef[]>> = {
  speed: [lin("m s-1", 1), lin("cm s-1", 0.01), lin("mm s-1", 0.001), lin("knot", KNOT_IN_M_S), lin("km h-1", 1 / 3.6)],
  pressure: [lin("Pa", 1), lin("hPa", 100), lin("mbar", 100), lin("kPa", 1000)],
  temperature: [lin("K", 1), lin("degC", 1, 273.15), lin("degF", 5 / 9, 273.15 - (32 * 5) / 9)],
  fraction: [lin("1", 1), lin("percent", 0.01)],
  angle: [lin("degree", 1)],
  latitude: [lin("degree_north", 1), lin("degree", 1)],
  longitude: [lin("degree_east", 1), lin("degree", 1)],
  salinity: [lin("1", 1), lin("psu", 1)],
  length: [lin("m", 1), lin("cm", 0.01)],
};

/** Spellings seen in logger headers mapped to the UDUNITS form (case-insensitive lookup). */
const aliases: Record<string, string> = {
  "m/s": "m s-1",
  "cm/s": "cm s-1",
  "mm/s": "mm s-1",
  kn: "knot",
  kt: "knot",
  knots: "knot",
  "km/h": "km h-1",
  mb: "mbar",
  hpa: "hPa",
  pa: "Pa",
  kpa: "kPa",
  c: "degC",
  "°c": "degC",
  celsius: "degC",
  k: "K",
  f: "degF",
  "°f": "degF",
  "%": "percent",
  deg: "degree",
  degrees: "degree",
  "°": "degree",
};

/** Normalises a unit spelling to its UDUNITS form; unknown spellings are returned unchanged. Cost O(1). */
export function normalizeUnit(unit: string): string {
  const t = unit.trim();
  return aliases[t.toLowerCase()] ?? t;
}

/** The conversion for `unit` within `dimension`, or undefined when the unit does not belong to it. */
export function findUnit(dimension: Dimension, unit: string): UnitDef | undefined {
  const u = normalizeUnit(unit);
  return unitsByDimension[dimension].find((d) => d.unit === u);
}

/** Converts one value to the canonical unit of its dimension. NaN stays NaN. Throws on a unit outside the dimension (programmer error). */
export function toCanonical(value: number, dimension: Dimension, unit: string): number {
  const d = findUnit(dimension, unit);
  if (!d) throw new Error(`unit ${unit} is not a ${dimension} unit`);
  return value * d.scale + d.offset;
}

/** Converts one canonical value to `unit`. NaN stays NaN. Throws on a unit outside the dimension (programmer error). */
export function fromCanonical(value: number, dimension: Dimension, unit: string): number {
  const d = findUnit(dimension, unit);
  if (!d) throw new Error(`unit ${unit} is not a ${dimension} unit`);
  return (value - d.offset) / d.scale;
}

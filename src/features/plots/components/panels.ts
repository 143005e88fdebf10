/** The plot panels of the explore page: which variables go together on one axis (one unit per panel). */
export interface PanelDef {
  id: string;
  title: string;
  unit: string;
  variables: { key: string; label: string }[];
  /** Only for drifters (position), only for moorings, or both. */
  kinds?: ("mooring" | "drifter")[];
}

export const panelDefs: PanelDef[] = [
  {
    id: "wind",
    title: "Wind speed",
    unit: "m s-1",
    variables: [
      { key: "wind_speed", label: "at the sensor" },
      { key: "wind_speed_10m_neutral", label: "neutral 10 m" },
      { key: "wind_speed_of_gust", label: "gust" },
    ],
  },
  {
    id: "stress",
    title: "Wind stress",
    unit: "Pa",
    variables: [
      { key: "magnitude_of_surface_downward_stress", label: "magnitude" },
      { key: "surface_downward_eastward_stress", label: "eastward" },
      { key: "surface_downward_northward_stress", label: "northward" },
    ],
  },
  {
    id: "ekman",
    title: "Ekman transport",
    unit: "m2 s-1",
    variables: [
      { key: "ekman_transport_eastward", label: "eastward" },
      { key: "ekman_transport_northward", label: "northward" },
    ],
  },
  {
    id: "current",
    title: "Current",
    unit: "m s-1",
    variables: [
      { key: "eastward_sea_water_velocity", label: "eastward" },
      { key: "northward_sea_water_velocity", label: "northward" },
      { key: "surface_eastward_sea_water_velocity", label: "drift eastward" },
      { key: "surface_northward_sea_water_velocity", label: "drift northward" },
    ],
  },
  {
    id: "temperature",
    title: "Temperature",
    unit: "K",
    variables: [
      { key: "air_temperature", label: "air" },
      { key: "sea_surface_temperature", label: "sea surface" },
    ],
  },
  { id: "pressure", title: "Air pressure", unit: "Pa", variables: [{ key: "air_pressure", label: "at the sensor" }, { key: "air_pressure_at_mean_sea_level", label: "sea level" }] },
  { id: "humidity", title: "Relative humidity", unit: "1", variables: [{ key: "relative_humidity", label: "relative humidity" }] },
  { id: "latitude", title: "Latitude", unit: "degree_north", variables: [{ key: "latitude", label: "latitude" }], kinds: ["drifter"] },
  { id: "longitude", title: "Longitude", unit: "degree_east", variables: [{ key: "longitude", label: "longitude" }], kinds: ["drifter"] },
];

/** Vector pairs drawn as sticks. */
export const stickDefs = [
  { id: "wind-sticks", title: "Wind vectors", unit: "m s-1", u: "eastward_wind", v: "northward_wind", noun: "air" },
  { id: "current-sticks", title: "Current vectors", unit: "m s-1", u: "eastward_sea_water_velocity", v: "northward_sea_water_velocity", noun: "water" },
] as const;

/** Panels with at least one variable the version has, narrowed to those variables. */
export function panelsFor(available: string[], kind: "mooring" | "drifter"): PanelDef[] {
  const have = new Set(available);
  return panelDefs
    .filter((p) => !p.kinds || p.kinds.includes(kind))
    .map((p) => ({ ...p, variables: p.variables.filter((v) => have.has(v.key)) }))
    .filter((p) => p.variables.length > 0);
}

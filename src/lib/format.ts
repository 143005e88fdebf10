/** Times are always shown in UTC with the zone written: "2026-03-05 12:00 UTC". */
export function formatUtc(iso: string | null | undefined, withSeconds = false): string {
  if (!iso) return "—";
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  const s = d.toISOString();
  return `${s.slice(0, 10)} ${s.slice(11, withSeconds ? 19 : 16)} UTC`;
}

export function formatUtcDate(iso: string | null | undefined): string {
  if (!iso) return "—";
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  return d.toISOString().slice(0, 10);
}

/** A fixed number of decimals with a true minus sign; "—" for missing. */
export function formatNumber(v: number | null | undefined, decimals = 1): string {
  if (v === null || v === undefined || Number.isNaN(v)) return "—";
  return v.toFixed(decimals).replace(/^-/, "−");
}

/** Latitude/longitude in decimal degrees with hemisphere letters: "57.412° N". */
export function formatLat(v: number | null | undefined): string {
  if (v === null || v === undefined) return "—";
  return `${Math.abs(v).toFixed(3)}° ${v >= 0 ? "N" : "S"}`;
}
export function formatLon(v: number | null | undefined): string {
  if (v === null || v === undefined) return "—";
  return `${Math.abs(v).toFixed(3)}° ${v >= 0 ? "E" : "W"}`;
}

/** "2026-03-05T12:00:00Z" → "2026-03-05 12:00" (seconds kept when not zero) for a time input read as UTC. */
export function isoToUtcInput(iso: string | null | undefined): string {
  if (!iso) return "";
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return "";
  const s = d.toISOString();
  return `${s.slice(0, 10)} ${s.slice(11, s.slice(17, 19) === "00" ? 16 : 19)}`;
}

/**
 * The reverse: a typed UTC time → ISO 8601 with Z. Accepts "YYYY-MM-DD hh:mm[:ss]", a "T" instead of the
 * space, and a trailing "Z" or "UTC". Anything else is passed on unchanged so the schema can explain the format.
 */
export function utcInputToIso(v: string): string {
  const t = v.trim();
  if (!t) return "";
  const m = /^(\d{4}-\d{2}-\d{2})[T ](\d{2}:\d{2})(:\d{2}(?:\.\d+)?)?\s*(Z|UTC)?$/i.exec(t);
  if (m) return `${m[1]}T${m[2]}${m[3] ?? ":00"}Z`;
  return t;
}

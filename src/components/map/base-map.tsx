import { useEffect, useId, useMemo, useRef, useState, type PointerEvent as ReactPointerEvent } from "react";
import { geoCircle, geoGraticule10, geoMercator, geoPath, type GeoPermissibleObjects } from "d3-geo";
import { feature } from "topojson-client";
import type { Topology } from "topojson-specification";
import type { FeatureCollection } from "geojson";
import { FlagGlyph, qcFlagWords, type QcFlag } from "@/components/ui/flag-badge";

/**
 * Offline base map: Natural Earth land (world-atlas, shipped in the bundle) drawn as SVG with d3-geo. No tiles, no
 * network. Shows points, tracks (coloured by a value or by QC flag, with a legend), circles given in metres (a
 * mooring's watch circle) and, on request, lets a person draw a rectangle and reports its bounding box.
 */

export interface MapPoint {
  id: string;
  lon: number;
  lat: number;
  label: string;
}
export interface MapTrack {
  id: string;
  label: string;
  /** [longitude, latitude] per point. */
  coords: [number, number][];
  /** A value per point for colouring by value (e.g. speed in m s-1); null where unknown. */
  values?: (number | null)[];
  /** QC flag per point, for colouring by flag. */
  flags?: number[];
}
export interface MapCircle {
  id: string;
  lon: number;
  lat: number;
  radiusM: number;
  label: string;
}
/** [west, south, east, north] in degrees. */
export type Bbox = [number, number, number, number];

export interface BaseMapProps {
  points?: MapPoint[];
  tracks?: MapTrack[];
  circles?: MapCircle[];
  /** How tracks are coloured. */
  colourBy?: "value" | "flag";
  /** Legend title and unit for colouring by value. */
  valueLabel?: string;
  valueUnit?: string;
  /** Area to show; defaults to everything drawn, padded. */
  extent?: Bbox;
  /** Rectangle drawing: drag on the map; the box is reported in degrees. */
  drawRectangle?: boolean;
  onBbox?: (bbox: Bbox) => void;
  /** Accessible name of the map. */
  label: string;
  height?: number;
  className?: string;
  /** Smallest padding around what is drawn, degrees (keeps the coast in view around a single point). */
  minPadDeg?: number;
  /** Drawing width in SVG units (the map scales to its box; a small inset wants a small width so its text stays legible). */
  viewWidth?: number;
}

const EARTH_RADIUS_M = 6371008.8;

type Land = FeatureCollection;
let landCache: Promise<Land> | undefined;
/** Natural Earth 1:50m land, loaded once in its own chunk when a map first appears. */
function loadLand(): Promise<Land> {
  landCache ??= import("world-atlas/land-50m.json").then((m) => {
    const topo = (m.default ?? m) as unknown as Topology;
    return feature(topo, topo.objects.land!) as unknown as Land;
  });
  return landCache;
}

/** Sequential colours (light to deep water), readable on the foam background and in dark mode. */
const RAMP = ["#9ad1c8", "#4fa8b5", "#2a7fa3", "#1f5a8c", "#2b3a73"];
const rampColour = (f: number) => RAMP[Math.max(0, Math.min(RAMP.length - 1, Math.floor(f * RAMP.length)))]!;
const flagColour: Record<number, string> = { 1: "var(--t-flag-pass)", 2: "var(--t-flag-ne)", 3: "var(--t-flag-suspect)", 4: "var(--t-flag-fail)", 9: "var(--t-flag-missing)" };

function boundsOf(points: MapPoint[], tracks: MapTrack[], circles: MapCircle[]): Bbox | null {
  let w = Infinity, s = Infinity, e = -Infinity, n = -Infinity;
  const add = (lon: number, lat: number) => {
    if (!Number.isFinite(lon) || !Number.isFinite(lat)) return;
    w = Math.min(w, lon);
    e = Math.max(e, lon);
    s = Math.min(s, lat);
    n = Math.max(n, lat);
  };
  for (const p of points) add(p.lon, p.lat);
  for (const t of tracks) for (const [lo, la] of t.coords) add(lo, la);
  for (const c of circles) {
    const d = (c.radiusM / EARTH_RADIUS_M) * (180 / Math.PI);
    add(c.lon - d / Math.cos((c.lat * Math.PI) / 180), c.lat - d);
    add(c.lon + d / Math.cos((c.lat * Math.PI) / 180), c.lat + d);
  }
  return Number.isFinite(w) ? [w, s, e, n] : null;
}

export function BaseMap({ points = [], tracks = [], circles = [], colourBy = "value", valueLabel = "Speed", valueUnit = "m s-1", extent, drawRectangle, onBbox, label, height = 420, className, minPadDeg = 0.5, viewWidth = 800 }: BaseMapProps) {
  const W = viewWidth;
  const [land, setLand] = useState<Land | null>(null);
  const [drag, setDrag] = useState<{ x0: number; y0: number; x1: number; y1: number; done?: boolean } | null>(null);
  const svgRef = useRef<SVGSVGElement>(null);
  const titleId = useId();
  useEffect(() => {
    let live = true;
    void loadLand().then((l) => live && setLand(l));
    return () => {
      live = false;
    };
  }, []);

  const box = useMemo<Bbox>(() => {
    const b = extent ?? boundsOf(points, tracks, circles) ?? [-40, 30, -10, 55];
    // Pad, and never zoom closer than ~0.2° so a single mooring keeps its coast in view.
    const padLon = Math.max((b[2] - b[0]) * 0.15, minPadDeg * 1.4);
    const padLat = Math.max((b[3] - b[1]) * 0.15, minPadDeg);
    return [Math.max(-180, b[0] - padLon), Math.max(-80, b[1] - padLat), Math.min(180, b[2] + padLon), Math.min(84, b[3] + padLat)];
  }, [extent, points, tracks, circles, minPadDeg]);

  const projection = useMemo(() => {
    const frame: GeoPermissibleObjects = {
      type: "Feature",
      properties: {},
      geometry: { type: "MultiPoint", coordinates: [[box[0], box[1]], [box[2], box[3]], [box[0], box[3]], [box[2], box[1]]] },
    };
    // Clipped to the frame, so land far outside the view is not drawn at all.
    return geoMercator()
      .fitExtent(
        [
          [8, 8],
          [W - 8, height - 8],
        ],
        frame,
      )
      .clipExtent([
        [0, 0],
        [W, height],
      ]);
  }, [box, height, W]);
  const path = useMemo(() => geoPath(projection), [projection]);

  const valueRange = useMemo(() => {
    let lo = Infinity, hi = -Infinity;
    for (const t of tracks) for (const v of t.values ?? []) if (v !== null && Number.isFinite(v)) (lo = Math.min(lo, v)), (hi = Math.max(hi, v));
    return Number.isFinite(lo) ? [lo, hi] : null;
  }, [tracks]);

  const toSvg = (e: ReactPointerEvent<SVGSVGElement>) => {
    const r = svgRef.current!.getBoundingClientRect();
    return [((e.clientX - r.left) / r.width) * W, ((e.clientY - r.top) / r.height) * height] as const;
  };
  const finish = () => {
    if (!drag || drag.done || !onBbox) return setDrag(null);
    const a = projection.invert!([Math.min(drag.x0, drag.x1), Math.max(drag.y0, drag.y1)]);
    const b = projection.invert!([Math.max(drag.x0, drag.x1), Math.min(drag.y0, drag.y1)]);
    // The drawn box stays on the map until the next drag.
    setDrag({ ...drag, done: true });
    if (a && b && Math.abs(drag.x1 - drag.x0) > 4 && Math.abs(drag.y1 - drag.y0) > 4) {
      const round = (x: number) => Math.round(x * 1000) / 1000;
      onBbox([round(a[0]), round(a[1]), round(b[0]), round(b[1])]);
    }
  };

  const graticule = useMemo(() => path(geoGraticule10()) ?? "", [path]);
  const lonLabel = (x: number) => `${Math.abs(x).toFixed(1)}° ${x >= 0 ? "E" : "W"}`;
  const latLabel = (x: number) => `${Math.abs(x).toFixed(1)}° ${x >= 0 ? "N" : "S"}`;

  return (
    <figure className={className} data-testid="base-map">
      <svg
        ref={svgRef}
        viewBox={`0 0 ${W} ${height}`}
        role="img"
        aria-labelledby={titleId}
        className={drawRectangle ? "w-full cursor-crosshair touch-none select-none rounded-lg border border-line bg-sunken" : "w-full rounded-lg border border-line bg-sunken"}
        onPointerDown={
          drawRectangle
            ? (e) => {
                const [x, y] = toSvg(e);
                (e.target as Element).setPointerCapture?.(e.pointerId);
                setDrag({ x0: x, y0: y, x1: x, y1: y });
              }
            : undefined
        }
        onPointerMove={drawRectangle && drag && !drag.done ? (e) => setDrag({ ...drag, x1: toSvg(e)[0], y1: toSvg(e)[1] }) : undefined}
        onPointerUp={drawRectangle ? finish : undefined}
      >
        <title id={titleId}>{label}</title>
        <path d={graticule} fill="none" stroke="var(--t-border)" strokeWidth={0.6} />
        {land ? <path d={path(land) ?? ""} fill="var(--t-surface)" stroke="var(--t-field)" strokeWidth={0.8} data-testid="map-land" /> : null}
        {circles.map((c) => (
          <path
            key={c.id}
            d={path(geoCircle().center([c.lon, c.lat]).radius((c.radiusM / EARTH_RADIUS_M) * (180 / Math.PI)).precision(2)()) ?? ""}
            fill="none"
            stroke="var(--t-accent)"
            strokeWidth={1.5}
            strokeDasharray="5 3"
          >
            <title>{c.label}</title>
          </path>
        ))}
        {tracks.map((t) => (
          <g key={t.id} data-testid="map-track">
            <title>{t.label}</title>
            {t.coords.slice(1).map((c, i) => {
              const a = projection(t.coords[i]!);
              const b = projection(c);
              if (!a || !b) return null;
              const v = t.values?.[i + 1];
              const f = t.flags?.[i + 1] ?? 1;
              const stroke =
                colourBy === "flag" ? flagColour[f] ?? flagColour[9] : v !== null && v !== undefined && valueRange ? rampColour((v - valueRange[0]) / (valueRange[1] - valueRange[0] || 1)) : "var(--t-muted)";
              return <line key={i} x1={a[0]} y1={a[1]} x2={b[0]} y2={b[1]} stroke={stroke} strokeWidth={2.2} strokeLinecap="round" />;
            })}
            {colourBy === "flag"
              ? t.coords.map((c, i) => {
                  const f = t.flags?.[i];
                  const p = projection(c);
                  if (!p || (f !== 3 && f !== 4)) return null;
                  // Flagged fixes also get their glyph, so the flag does not rest on colour.
                  return f === 3 ? (
                    <path key={`g${i}`} d={`M${p[0]} ${p[1] - 5} l5 8.5 h-10z`} fill={flagColour[3]} stroke="var(--t-surface)" strokeWidth={0.8} />
                  ) : (
                    <path key={`g${i}`} d={`M${p[0] - 4} ${p[1] - 4} l8 8 m0 -8 l-8 8`} stroke={flagColour[4]} strokeWidth={2.4} strokeLinecap="round" />
                  );
                })
              : null}
            {(() => {
              const s = projection(t.coords[0]!);
              const e = projection(t.coords[t.coords.length - 1]!);
              return (
                <>
                  {s ? <circle cx={s[0]} cy={s[1]} r={3.5} fill="var(--t-surface)" stroke="var(--t-fg)" strokeWidth={1.4} /> : null}
                  {e ? <rect x={e[0] - 3.5} y={e[1] - 3.5} width={7} height={7} fill="var(--t-fg)" /> : null}
                </>
              );
            })()}
          </g>
        ))}
        {points.map((p) => {
          const xy = projection([p.lon, p.lat]);
          if (!xy) return null;
          return (
            <g key={p.id} data-testid="map-point">
              <circle cx={xy[0]} cy={xy[1]} r={5} fill="var(--t-signal-fill)" stroke="var(--t-fg)" strokeWidth={1.5} />
              <text x={xy[0] + 8} y={xy[1] - 8} fontSize={13} fill="var(--t-fg)" paintOrder="stroke" stroke="var(--t-bg)" strokeWidth={3}>
                {p.label}
              </text>
            </g>
          );
        })}
        {drag && drawRectangle ? (
          <rect
            x={Math.min(drag.x0, drag.x1)}
            y={Math.min(drag.y0, drag.y1)}
            width={Math.abs(drag.x1 - drag.x0)}
            height={Math.abs(drag.y1 - drag.y0)}
            fill="var(--t-signal-soft)"
            fillOpacity={0.5}
            stroke="var(--t-signal)"
            strokeWidth={1.5}
          />
        ) : null}
        <text x={W - 8} y={height - 8} textAnchor="end" fontSize={11} fill="var(--t-muted)">
          {lonLabel(box[0])} – {lonLabel(box[2])}, {latLabel(box[1])} – {latLabel(box[3])} · land: Natural Earth
        </text>
      </svg>
      {tracks.length ? (
        <figcaption className="mt-2 flex flex-wrap items-center gap-x-4 gap-y-1 text-sm text-muted" data-testid="map-legend">
          <span className="inline-flex items-center gap-1">
            <svg aria-hidden viewBox="0 0 10 10" className="size-3">
              <circle cx="5" cy="5" r="3.5" fill="none" stroke="currentColor" strokeWidth="1.4" />
            </svg>
            start
          </span>
          <span className="inline-flex items-center gap-1">
            <svg aria-hidden viewBox="0 0 10 10" className="size-3">
              <rect x="1.5" y="1.5" width="7" height="7" fill="currentColor" />
            </svg>
            end
          </span>
          {colourBy === "flag" ? (
            ([1, 3, 4] as QcFlag[]).map((f) => (
              <span key={f} className="inline-flex items-center gap-1">
                <FlagGlyph flag={f} /> {qcFlagWords[f]} position
              </span>
            ))
          ) : valueRange ? (
            <span className="inline-flex items-center gap-1.5">
              {valueLabel} ({valueUnit}):
              <span className="num">{valueRange[0].toFixed(2)}</span>
              <svg aria-hidden viewBox="0 0 50 8" className="h-2 w-14">
                {RAMP.map((c, i) => (
                  <rect key={c} x={i * 10} y={0} width={10} height={8} fill={c} />
                ))}
              </svg>
              <span className="num">{valueRange[1].toFixed(2)}</span>
            </span>
          ) : null}
        </figcaption>
      ) : null}
    </figure>
  );
}

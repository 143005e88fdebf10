import { useState } from "react";
import { BaseMap, type Bbox } from "@/components/map/base-map";
import { Alert } from "@/components/ui/alert";
import { Loading } from "@/components/ui/loading";
import { getErrorMessage } from "@/lib/api-client";
import { useTrack } from "../api/get-plot-window";

/**
 * Where a version's data came from, on the offline base map: a mooring's nominal position and watch circle, or each
 * drifter's hourly track coloured by speed or by the flag of its positions.
 */
export function VersionMap({ versionId, height = 420 }: { versionId: string; height?: number }) {
  const q = useTrack(versionId);
  const [colourBy, setColourBy] = useState<"value" | "flag">("value");
  const [drawing, setDrawing] = useState(false);
  const [bbox, setBbox] = useState<Bbox | null>(null);
  if (q.isPending) return <Loading label="Loading the map…" />;
  if (q.error) return <Alert tone="attention" title="The map could not be loaded">{getErrorMessage(q.error)}</Alert>;
  const t = q.data;
  const d = t.deployment;
  const points = d && d.latitude !== null && d.longitude !== null ? [{ id: "deployment", lon: d.longitude, lat: d.latitude, label: d.name }] : [];
  const circles = d && d.latitude !== null && d.longitude !== null && d.watchCircleM ? [{ id: "watch", lon: d.longitude, lat: d.latitude, radiusM: d.watchCircleM, label: `Watch circle, ${d.watchCircleM} m` }] : [];
  const tracks = t.tracks.map((x) => ({
    id: x.platform || "track",
    label: x.platform ? `Drifter ${x.platform}` : "Track",
    coords: x.points.map((p) => [p[1], p[2]] as [number, number]),
    values: x.points.map((p) => p[3]),
    flags: x.points.map((p) => p[4]),
  }));
  const hasSpeed = tracks.some((x) => x.values.some((v) => v !== null));
  return (
    <div className="space-y-2">
      {tracks.length ? (
        <fieldset className="flex flex-wrap gap-4 text-sm">
          <legend className="sr-only">Colour tracks by</legend>
          <label className="inline-flex items-center gap-1">
            <input type="radio" name="track-colour" checked={colourBy === "value"} onChange={() => setColourBy("value")} disabled={!hasSpeed} /> Colour by speed
          </label>
          <label className="inline-flex items-center gap-1">
            <input type="radio" name="track-colour" checked={colourBy === "flag"} onChange={() => setColourBy("flag")} /> Colour by position flag
          </label>
        </fieldset>
      ) : null}
      {!points.length && !tracks.length ? (
        <Alert tone="info">This version has no positions and its deployment no nominal position, so there is nothing to place on the map. Add the position to the deployment.</Alert>
      ) : null}
      <div className="flex flex-wrap items-center gap-3 text-sm">
        <label className="inline-flex items-center gap-1">
          <input type="checkbox" checked={drawing} onChange={(e) => setDrawing(e.target.checked)} data-testid="draw-box" /> Drag on the map to read an area's bounds
        </label>
        {bbox ? (
          <output className="num rounded border border-line bg-surface px-2 py-0.5" data-testid="map-bbox">
            W {bbox[0]}°, S {bbox[1]}°, E {bbox[2]}°, N {bbox[3]}°
          </output>
        ) : null}
      </div>
      <BaseMap
        drawRectangle={drawing}
        onBbox={setBbox}
        label={t.kind === "mooring" ? "Mooring position and watch circle" : "Drifter tracks"}
        points={points}
        circles={circles}
        tracks={tracks}
        colourBy={hasSpeed ? colourBy : "flag"}
        valueLabel="Drift speed"
        valueUnit="m s-1"
        height={height}
      />
      {circles.length ? (
        <div className="grid gap-3 sm:grid-cols-[1fr_20rem] sm:items-start">
          <p className="text-sm text-muted">Dashed: the mooring's watch circle ({d!.watchCircleM} m) around its nominal position, too small to see at this scale; the close-up shows it.</p>
          <BaseMap label={`Close-up of the ${d!.watchCircleM} m watch circle`} points={points.map((p) => ({ ...p, label: "" }))} circles={circles} minPadDeg={0} height={240} viewWidth={320} />
        </div>
      ) : null}
    </div>
  );
}

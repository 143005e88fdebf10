import type { CatalogueItem } from "@shared/schemas/catalogue";
import { BaseMap, type Bbox } from "@/components/map/base-map";

const round = (x: number) => Math.round(x * 100) / 100;

/**
 * The datasets of this page on the offline map; dragging a rectangle searches that area (the same bbox filter
 * as the typed edges, so the link can be shared).
 */
export function CatalogueMap({ items, bbox, onArea }: { items: CatalogueItem[]; bbox?: string; onArea: (bbox: string) => void }) {
  const points = items
    .filter((it) => it.bounds)
    .map((it) => ({ id: it.id, lon: (it.bounds!.west + it.bounds!.east) / 2, lat: (it.bounds!.south + it.bounds!.north) / 2, label: it.title }));
  const parts = (bbox ?? "").split(",").map(Number);
  const extent = parts.length === 4 && parts.every(Number.isFinite) && parts[0]! <= parts[2]! ? (parts as Bbox) : undefined;
  return (
    <figure className="max-w-3xl space-y-1">
      <BaseMap
        label="Released datasets of this page on a map; drag a rectangle to search that area"
        points={points}
        extent={extent}
        drawRectangle
        onBbox={(b) => onArea(b.map(round).join(","))}
        height={300}
        minPadDeg={2}
      />
      <figcaption className="text-sm text-muted">Drag a rectangle on the map to search that area. Positions are deployment points, or the centre of a drifter's area.</figcaption>
    </figure>
  );
}

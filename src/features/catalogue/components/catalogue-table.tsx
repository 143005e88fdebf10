import { Link } from "react-router-dom";
import type { CatalogueItem } from "@shared/schemas/catalogue";
import { paths } from "@/config/paths";
import { formatLat, formatLon, formatUtcDate } from "@/lib/format";
import { KindLabel } from "@/components/ui/kind-label";
import { Table, Td, Th, Tr } from "@/components/ui/table";

/** Where a dataset lies: a point, or the box its positions span. */
function Where({ it }: { it: CatalogueItem }) {
  const b = it.bounds;
  if (!b) return <>—</>;
  if (b.west === b.east && b.south === b.north) return <>{`${formatLat(b.south)}, ${formatLon(b.west)}`}</>;
  return <>{`${formatLat(b.south)}–${formatLat(b.north)}, ${formatLon(b.west)}–${formatLon(b.east)}`}</>;
}

export function CatalogueTable({ items }: { items: CatalogueItem[] }) {
  return (
    <Table caption="Released datasets">
      <thead>
        <tr>
          <Th>Dataset</Th>
          <Th>Platform</Th>
          <Th>Position</Th>
          <Th>Data (UTC)</Th>
          <Th numeric>Variables</Th>
          <Th numeric>Version</Th>
          <Th>Released (UTC)</Th>
          <Th>Licence</Th>
        </tr>
      </thead>
      <tbody>
        {items.map((e) => (
          <Tr key={e.id}>
            <Td>
              <Link to={paths.dataset(e.id)} className="font-semibold">
                {e.title}
              </Link>
              <div className="text-sm text-muted">{e.projectName}</div>
            </Td>
            <Td>
              <div>{e.platformName ?? "—"}</div>
              <div className="text-sm text-muted">
                <KindLabel kind={e.platformKind} />
              </div>
            </Td>
            <Td className="num whitespace-nowrap text-sm">
              <Where it={e} />
            </Td>
            <Td className="num whitespace-nowrap">
              {formatUtcDate(e.startTime)} – {formatUtcDate(e.endTime)}
            </Td>
            <Td numeric title={e.variables.join(", ")}>
              {e.variables.length}
            </Td>
            <Td numeric>v{e.releasedVersion}</Td>
            <Td className="num whitespace-nowrap">{formatUtcDate(e.releasedAt)}</Td>
            <Td className="whitespace-nowrap">{e.licence}</Td>
          </Tr>
        ))}
      </tbody>
    </Table>
  );
}

import { Link } from "react-router-dom";
import type { CatalogueEntry } from "@shared/schemas/datasets";
import { paths } from "@/config/paths";
import { formatLat, formatLon, formatUtcDate } from "@/lib/format";
import { KindLabel } from "@/components/ui/kind-label";
import { Table, Td, Th, Tr } from "@/components/ui/table";

export function CatalogueTable({ items }: { items: CatalogueEntry[] }) {
  return (
    <Table caption="Released datasets">
      <thead>
        <tr>
          <Th>Dataset</Th>
          <Th>Platform</Th>
          <Th numeric unit="°">Latitude</Th>
          <Th numeric unit="°">Longitude</Th>
          <Th>Time span (UTC)</Th>
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
            <Td numeric>{formatLat(e.latitude)}</Td>
            <Td numeric>{formatLon(e.longitude)}</Td>
            <Td className="num whitespace-nowrap">
              {formatUtcDate(e.startTime)} – {formatUtcDate(e.endTime)}
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

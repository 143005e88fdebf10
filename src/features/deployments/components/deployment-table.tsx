import type { Deployment } from "@shared/schemas/platforms";
import { formatLat, formatLon, formatNumber } from "@/lib/format";
import { Button } from "@/components/ui/button";
import { Table, Td, Th, Tr } from "@/components/ui/table";
import { UtcTime } from "@/components/ui/utc-time";

export function DeploymentTable({ items, onEdit }: { items: Deployment[]; onEdit?: (d: Deployment) => void }) {
  return (
    <Table caption="Deployments">
      <thead>
        <tr>
          <Th>Deployment</Th>
          <Th>Start (UTC)</Th>
          <Th>End (UTC)</Th>
          <Th numeric unit="°">Latitude</Th>
          <Th numeric unit="°">Longitude</Th>
          <Th numeric unit="m">Water depth</Th>
          <Th numeric unit="m">Watch circle</Th>
          <Th numeric unit="m">Anemometer</Th>
          <Th numeric unit="m">Current meter</Th>
          <Th numeric unit="° true">Offshore</Th>
          {onEdit ? <Th className="text-right">Actions</Th> : null}
        </tr>
      </thead>
      <tbody>
        {items.map((d) => (
          <Tr key={d.id}>
            <Td className="font-semibold">
              {d.name}
              {d.notes ? <div className="line-clamp-1 text-sm font-normal text-muted">{d.notes}</div> : null}
            </Td>
            <Td>
              <UtcTime iso={d.startTime} />
            </Td>
            <Td>{d.endTime ? <UtcTime iso={d.endTime} /> : <span className="text-sm text-muted">at sea</span>}</Td>
            <Td numeric>{formatLat(d.latitude)}</Td>
            <Td numeric>{formatLon(d.longitude)}</Td>
            <Td numeric>{formatNumber(d.waterDepthM, 0)}</Td>
            <Td numeric>{formatNumber(d.watchCircleRadiusM, 0)}</Td>
            <Td numeric>{formatNumber(d.anemometerHeightM, 1)}</Td>
            <Td numeric>{formatNumber(d.currentMeterDepthM, 1)}</Td>
            <Td numeric>{formatNumber(d.coastlineOffshoreBearingDeg, 0)}</Td>
            {onEdit ? (
              <Td className="text-right">
                <Button size="sm" variant="secondary" onClick={() => onEdit(d)} aria-label={`Edit deployment ${d.name}`}>
                  Edit
                </Button>
              </Td>
            ) : null}
          </Tr>
        ))}
      </tbody>
    </Table>
  );
}

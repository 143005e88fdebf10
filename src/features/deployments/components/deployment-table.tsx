import type { Deployment } from "@shared/schemas/platforms";
import { formatLat, formatLon, formatNumber } from "@/lib/format";
import { Button } from "@/components/ui/button";
import { Table, Td, Th, Tr } from "@/components/ui/table";
import { UtcTime } from "@/components/ui/utc-time";

export function DeploymentTable({ items, onEdit, onThresholds }: { items: Deployment[]; onEdit?: (d: Deployment) => void; onThresholds?: (d: Deployment) => void }) {
  return (
    <Table caption="Deployments">
      <thead>
        <tr>
          <Th>Deployment</Th>
          <Th>Period at sea (UTC)</Th>
          <Th numeric unit="°">Latitude</Th>
          <Th numeric unit="°">Longitude</Th>
          <Th numeric unit="m">Depth</Th>
          <Th numeric unit="m">Watch circle</Th>
          <Th numeric unit="m">Anemometer</Th>
          <Th numeric unit="m">Current meter</Th>
          <Th numeric unit="° true">Offshore</Th>
        </tr>
      </thead>
      <tbody>
        {items.map((d) => (
          <Tr key={d.id}>
            <Td>
              <div className="flex items-start justify-between gap-2">
                <span className="whitespace-nowrap font-semibold">{d.name}</span>
                <span className="flex gap-1">
                  {onEdit ? (
                    <Button size="sm" variant="secondary" onClick={() => onEdit(d)} aria-label={`Edit deployment ${d.name}`}>
                      Edit
                    </Button>
                  ) : null}
                  {onThresholds ? (
                    <Button size="sm" variant="secondary" onClick={() => onThresholds(d)} aria-label={`QC thresholds of deployment ${d.name}`}>
                      QC thresholds
                    </Button>
                  ) : null}
                </span>
              </div>
              {d.notes ? <div className="line-clamp-1 max-w-xs text-sm text-muted">{d.notes}</div> : null}
            </Td>
            <Td>
              <div>
                <UtcTime iso={d.startTime} />
              </div>
              <div className="text-sm text-muted">
                to {d.endTime ? <UtcTime iso={d.endTime} /> : "still at sea"}
              </div>
            </Td>
            <Td numeric>{formatLat(d.latitude)}</Td>
            <Td numeric>{formatLon(d.longitude)}</Td>
            <Td numeric>{formatNumber(d.waterDepthM, 0)}</Td>
            <Td numeric>{formatNumber(d.watchCircleRadiusM, 0)}</Td>
            <Td numeric>{formatNumber(d.anemometerHeightM, 1)}</Td>
            <Td numeric>{formatNumber(d.currentMeterDepthM, 1)}</Td>
            <Td numeric>{formatNumber(d.coastlineOffshoreBearingDeg, 0)}</Td>
          </Tr>
        ))}
      </tbody>
    </Table>
  );
}

import type { VersionSummary } from "@shared/schemas/datasets";
import { StateBadge } from "@/components/ui/state-badge";
import { Table, Td, Th, Tr } from "@/components/ui/table";
import { UtcTime } from "@/components/ui/utc-time";

export function VersionsTable({ items }: { items: VersionSummary[] }) {
  const sorted = [...items].sort((a, b) => b.number - a.number);
  return (
    <Table caption="Versions of this dataset">
      <thead>
        <tr>
          <Th numeric>Version</Th>
          <Th>State</Th>
          <Th>Created (UTC)</Th>
          <Th>Created by</Th>
        </tr>
      </thead>
      <tbody>
        {sorted.map((v) => (
          <Tr key={v.id}>
            <Td numeric>v{v.number}</Td>
            <Td>
              <StateBadge state={v.state} />
            </Td>
            <Td>
              <UtcTime iso={v.createdAt} />
            </Td>
            <Td>{v.createdBy ?? "—"}</Td>
          </Tr>
        ))}
      </tbody>
    </Table>
  );
}

import { Link } from "react-router-dom";
import type { VersionSummary } from "@shared/schemas/datasets";
import { StateBadge } from "@/components/ui/state-badge";
import { Table, Td, Th, Tr } from "@/components/ui/table";
import { UtcTime } from "@/components/ui/utc-time";

/** `linkTo` gives the page a version number opens (members: the review page), or nothing. */
export function VersionsTable({ items, linkTo }: { items: VersionSummary[]; linkTo?: (v: VersionSummary) => string | null }) {
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
            <Td numeric>{linkTo?.(v) ? <Link to={linkTo(v)!}>v{v.number}</Link> : <>v{v.number}</>}</Td>
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

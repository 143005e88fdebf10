import { Link } from "react-router-dom";
import { paths } from "@/config/paths";
import { Table, Td, Th, Tr } from "@/components/ui/table";
import { UtcTime } from "@/components/ui/utc-time";
import type { ReviewQueueItem } from "../api/get-review-queue";

export function ReviewTable({ items }: { items: ReviewQueueItem[] }) {
  return (
    <Table caption="Versions waiting for review">
      <thead>
        <tr>
          <Th>Dataset</Th>
          <Th>Project</Th>
          <Th numeric>Version</Th>
          <Th>Submitted (UTC)</Th>
          <Th>Submitted by</Th>
        </tr>
      </thead>
      <tbody>
        {items.map((r) => (
          <Tr key={r.versionId}>
            <Td>
              <Link to={paths.reviewVersion(r.versionId)} className="font-semibold">
                {r.datasetTitle}
              </Link>
            </Td>
            <Td>{r.projectName}</Td>
            <Td numeric>
              <Link to={paths.reviewVersion(r.versionId)} aria-label={`v${r.number}: review version ${r.number} of ${r.datasetTitle}`}>
                v{r.number}
              </Link>
            </Td>
            <Td>
              <UtcTime iso={r.submittedAt} />
            </Td>
            <Td>{r.submittedBy ?? "—"}</Td>
          </Tr>
        ))}
      </tbody>
    </Table>
  );
}

import { Link } from "react-router-dom";
import { paths } from "@/config/paths";
import { formatUtcDate } from "@/lib/format";
import { StateBadge } from "@/components/ui/state-badge";
import { useDatasetReleases } from "../api/releases";

/** The dataset's releases, newest first, retracted ones included as tombstones; each links to its release page. */
export function DatasetReleases({ datasetId }: { datasetId: string }) {
  const { data } = useDatasetReleases(datasetId);
  if (!data) return null;
  if (!data.items.length) return <p className="text-sm text-muted">No release yet. A curator releases a version once another curator has approved it.</p>;
  return (
    <ul className="space-y-2" aria-label="Releases">
      {data.items.map((r) => (
        <li key={r.id} className="flex flex-wrap items-center gap-x-2 gap-y-1">
          <Link to={paths.release(r.id)} className="font-semibold">
            Release {r.releaseNumber} · v{r.versionNumber}
          </Link>
          <StateBadge state={r.versionState} />
          <span className="num text-sm text-muted">{formatUtcDate(r.releasedAt)}</span>
        </li>
      ))}
    </ul>
  );
}

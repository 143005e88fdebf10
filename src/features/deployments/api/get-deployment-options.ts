import { useQueries } from "@tanstack/react-query";
import { formatUtcDate } from "@/lib/format";
import { usePlatforms } from "@/features/platforms/api/get-platforms";
import { deploymentsQueryOptions } from "./get-deployments";

export type DeploymentOption = { value: string; label: string };

/** Every deployment of a project's platforms as choices for a select ("Platform · Deployment (from date)"). */
export function useDeploymentOptions(projectId: string, enabled: boolean): DeploymentOption[] {
  const platforms = usePlatforms(projectId);
  const queries = useQueries({ queries: enabled ? (platforms.data?.items ?? []).map((p) => deploymentsQueryOptions(p.id)) : [] });
  return (platforms.data?.items ?? []).flatMap((p, i) =>
    (queries[i]?.data?.items ?? []).map((d) => ({ value: d.id, label: `${p.name} · ${d.name} (from ${formatUtcDate(d.startTime)})` })),
  );
}

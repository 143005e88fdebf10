import { useQuery } from "@tanstack/react-query";
import type { QcReport } from "@shared/schemas/explore";
import { api } from "@/lib/api-client";

// GET /api/versions/:id/qc-report
export const useQcReport = (versionId: string) =>
  useQuery({ queryKey: ["explore", versionId, "qc-report"], queryFn: ({ signal }) => api.get<QcReport>(`/api/versions/${versionId}/qc-report`, signal) });

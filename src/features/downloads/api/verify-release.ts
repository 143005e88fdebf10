import { useMutation } from "@tanstack/react-query";
import type { ReleaseVerification } from "@shared/schemas/downloads";
import { api } from "@/lib/api-client";

// GET /api/v1/releases/:id/verify
export const useVerifyRelease = () => useMutation({ mutationFn: (releaseId: string) => api.get<ReleaseVerification>(`/api/v1/releases/${releaseId}/verify`) });

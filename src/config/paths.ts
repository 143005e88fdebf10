/** URL builders for every screen; the only place that spells client paths. */
export const paths = {
  home: () => "/",
  catalogue: (q?: { q?: string; kind?: string }) => {
    const s = new URLSearchParams();
    if (q?.q) s.set("q", q.q);
    if (q?.kind) s.set("kind", q.kind);
    const qs = s.toString();
    return qs ? `/?${qs}` : "/";
  },
  signIn: (redirectTo?: string) => (redirectTo ? `/sign-in?redirectTo=${encodeURIComponent(redirectTo)}` : "/sign-in"),
  signUp: () => "/sign-up",
  verified: () => "/verified",
  forgotPassword: () => "/forgot-password",
  resetPassword: () => "/reset-password",
  projects: () => "/projects",
  project: (id: string) => `/projects/${id}`,
  platform: (id: string) => `/platforms/${id}`,
  dataset: (id: string) => `/datasets/${id}`,
  /** `variable` (and a fleet's `platform`) bring that variable's plot into view. */
  versionExplore: (id: string, q?: { view?: string; from?: string; to?: string; variable?: string; platform?: string }) => {
    const s = new URLSearchParams(Object.entries(q ?? {}).filter((e): e is [string, string] => !!e[1]));
    return s.size ? `/versions/${id}/explore?${s}` : `/versions/${id}/explore`;
  },
  uploadMap: (datasetId: string, uploadId: string) => `/datasets/${datasetId}/uploads/${uploadId}`,
  version: (id: string) => `/versions/${id}`,
  reviewQueue: () => "/review",
  reviewVersion: (versionId: string) => `/review/${versionId}`,
  release: (releaseId: string) => `/releases/${releaseId}`,
  apiDocs: () => "/api-docs",
  adminUsers: () => "/admin/users",
  adminMail: () => "/admin/mail",
  adminMailMessage: (id: string) => `/admin/mail/${encodeURIComponent(id)}`,
} as const;

/** Only same-site paths are accepted as a place to go after sign-in. */
export function safeRedirect(to: string | null | undefined, fallback = "/projects"): string {
  if (!to || !to.startsWith("/") || to.startsWith("//") || to.startsWith("/\\")) return fallback;
  return to;
}

import { createBrowserRouter, RouterProvider } from "react-router-dom";
import { AppShell } from "@/components/layout/app-shell";
import { RequireAuth } from "@/components/layout/require-auth";
import { RouteError } from "@/components/layout/route-error";
import { NotificationBell } from "@/features/notifications/components/notification-bell";

const router = createBrowserRouter([
  {
    element: <AppShell notices={<NotificationBell />} />,
    errorElement: <RouteError />,
    children: [
      {
        errorElement: <RouteError />,
        children: [
          { index: true, lazy: () => import("@/routes/catalogue/catalogue") },
          { path: "sign-in", lazy: () => import("@/routes/auth/sign-in") },
          { path: "sign-up", lazy: () => import("@/routes/auth/sign-up") },
          { path: "verified", lazy: () => import("@/routes/auth/verified") },
          { path: "forgot-password", lazy: () => import("@/routes/auth/forgot-password") },
          { path: "reset-password", lazy: () => import("@/routes/auth/reset-password") },
          { path: "datasets/:datasetId", lazy: () => import("@/routes/datasets/dataset-detail") },
          { path: "versions/:versionId/explore", lazy: () => import("@/routes/versions/version-explore") },
          { path: "versions/:versionId", lazy: () => import("@/routes/versions/version-detail") },
          { path: "releases/:releaseId", lazy: () => import("@/routes/releases/release-detail") },
          { path: "api-docs", lazy: () => import("@/routes/api-docs/api-docs") },
          {
            element: <RequireAuth />,
            children: [
              { path: "projects", lazy: () => import("@/routes/projects/project-list") },
              { path: "projects/:projectId", lazy: () => import("@/routes/projects/project-detail") },
              { path: "platforms/:platformId", lazy: () => import("@/routes/platforms/platform-detail") },
              { path: "datasets/:datasetId/uploads/:uploadId", lazy: () => import("@/routes/datasets/upload-map") },
              { path: "review", lazy: () => import("@/routes/review/review-queue") },
              { path: "review/:versionId", lazy: () => import("@/routes/review/review-version") },
            ],
          },
          {
            path: "admin",
            element: <RequireAuth admin />,
            children: [
              { path: "users", lazy: () => import("@/routes/admin/users") },
              { path: "mail", lazy: () => import("@/routes/admin/mail") },
              { path: "mail/:messageId", lazy: () => import("@/routes/admin/mail") },
            ],
          },
          { path: "*", lazy: () => import("@/routes/not-found") },
        ],
      },
    ],
  },
]);

export function AppRouter() {
  return <RouterProvider router={router} />;
}

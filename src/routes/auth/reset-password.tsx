import { useSearchParams } from "react-router-dom";
import { AuthCard } from "@/components/layout/auth-card";
import { ResetPasswordForm } from "@/features/auth/components/reset-password-form";

export function Component() {
  const [params] = useSearchParams();
  const error = params.get("error");
  return (
    <AuthCard title="Choose a new password">
      <ResetPasswordForm token={error ? null : params.get("token")} />
    </AuthCard>
  );
}
export { RouteError as ErrorBoundary } from "@/components/layout/route-error";

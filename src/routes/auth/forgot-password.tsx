import { Link } from "react-router-dom";
import { paths } from "@/config/paths";
import { AuthCard } from "@/components/layout/auth-card";
import { ForgotPasswordForm } from "@/features/auth/components/forgot-password-form";

export function Component() {
  return (
    <AuthCard
      title="Reset your password"
      intro="Enter the e-mail address of your account and we will send you a link to choose a new password."
      footer={<Link to={paths.signIn()}>Back to sign-in</Link>}
    >
      <ForgotPasswordForm />
    </AuthCard>
  );
}
export { RouteError as ErrorBoundary } from "@/components/layout/route-error";

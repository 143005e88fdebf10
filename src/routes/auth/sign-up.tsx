import { Link } from "react-router-dom";
import { paths } from "@/config/paths";
import { AuthCard } from "@/components/layout/auth-card";
import { SignUpForm } from "@/features/auth/components/sign-up-form";

export function Component() {
  return (
    <AuthCard
      title="Create your Tauline account"
      intro="After you confirm your e-mail address, an administrator can add you to your observing project."
      footer={
        <>
          Already have an account? <Link to={paths.signIn()}>Sign in</Link>
        </>
      }
    >
      <SignUpForm />
    </AuthCard>
  );
}
export { RouteError as ErrorBoundary } from "@/components/layout/route-error";

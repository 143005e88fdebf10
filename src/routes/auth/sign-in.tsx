import { Link, useNavigate, useSearchParams } from "react-router-dom";
import { paths, safeRedirect } from "@/config/paths";
import { AuthCard } from "@/components/layout/auth-card";
import { SignInForm } from "@/features/auth/components/sign-in-form";

export function Component() {
  const [params] = useSearchParams();
  const navigate = useNavigate();
  const to = safeRedirect(params.get("redirectTo"));
  return (
    <AuthCard
      title="Sign in to Tauline"
      intro="Members of an observing project sign in to upload, check and release data. Browsing released data needs no account."
      footer={
        <>
          New here? <Link to={paths.signUp()}>Create an account</Link>
        </>
      }
    >
      <SignInForm onSignedIn={() => navigate(to, { replace: true })} />
    </AuthCard>
  );
}
export { RouteError as ErrorBoundary } from "@/components/layout/route-error";

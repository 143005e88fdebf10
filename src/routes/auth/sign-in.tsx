import { Link, useNavigate, useSearchParams } from "react-router-dom";
import { paths, safeRedirect } from "@/config/paths";
import { useMe } from "@/lib/session";
import { AuthCard } from "@/components/layout/auth-card";
import { ButtonLink } from "@/components/ui/button";
import { SignInForm } from "@/features/auth/components/sign-in-form";

export function Component() {
  const [params] = useSearchParams();
  const navigate = useNavigate();
  const to = safeRedirect(params.get("redirectTo"));
  const { data: me } = useMe();
  if (me) {
    return (
      <AuthCard title="You are signed in" intro={`Signed in as ${me.user.name} (${me.user.email}).`}>
        <ButtonLink to={to} variant="primary">
          Continue
        </ButtonLink>
      </AuthCard>
    );
  }
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

import { Navigate, Outlet, useLocation } from "react-router-dom";
import { paths } from "@/config/paths";
import { useMe } from "@/lib/session";
import { Loading } from "@/components/ui/loading";
import { Alert } from "@/components/ui/alert";
import { getErrorMessage } from "@/lib/api-client";

/** Sends signed-out people to sign-in and back here afterwards. Hides admin pages from non-admins. */
export function RequireAuth({ admin }: { admin?: boolean }) {
  const { data: me, isPending, error } = useMe();
  const location = useLocation();
  if (isPending) return <Loading label="Checking your session…" />;
  if (error) return <Alert tone="attention" title="We could not check your session">{getErrorMessage(error)}</Alert>;
  if (!me) return <Navigate to={paths.signIn(location.pathname + location.search)} replace />;
  if (admin && !me.user.isAdmin) {
    return (
      <Alert tone="attention" title="Administrators only">
        This page is for Tauline administrators. If you need access, ask an administrator of your organisation.
      </Alert>
    );
  }
  return <Outlet />;
}

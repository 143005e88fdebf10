import clsx from "clsx";
import { useEffect, useRef } from "react";
import { Link, NavLink, Outlet, useLocation, useNavigate } from "react-router-dom";
import { paths } from "@/config/paths";
import { isCuratorAnywhere, useMe, useSignOut } from "@/lib/session";
import { Wordmark } from "@/components/ui/logo";
import { Toaster } from "@/components/ui/toaster";
import { buttonClass } from "@/components/ui/button";
import { ThemeToggle } from "./theme-toggle";

function NavItem({ to, children, end }: { to: string; children: React.ReactNode; end?: boolean }) {
  return (
    <NavLink
      to={to}
      end={end}
      className={({ isActive }) =>
        clsx(
          "whitespace-nowrap rounded-md px-2.5 py-1.5 text-[0.95rem] font-semibold no-underline",
          isActive ? "bg-sunken text-fg shadow-[inset_0_-2px_0_var(--t-signal-fill)]" : "text-muted hover:bg-sunken hover:text-fg",
        )
      }
    >
      {children}
    </NavLink>
  );
}

/** `notices` is the signed-in user's notification control, passed in by the router (features stay out of layout). */
export function AppShell({ notices }: { notices?: React.ReactNode }) {
  const { data: me } = useMe();
  const signOut = useSignOut();
  const navigate = useNavigate();
  const { pathname } = useLocation();
  const mainRef = useRef<HTMLElement>(null);
  const firstRender = useRef(true);

  // After a client-side page change, move focus to the new page so keyboard and screen-reader users start at its top.
  useEffect(() => {
    if (firstRender.current) {
      firstRender.current = false;
      return;
    }
    mainRef.current?.focus({ preventScroll: true });
    window.scrollTo(0, 0);
  }, [pathname]);

  return (
    <div className="flex min-h-screen flex-col">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-50 focus:rounded focus:bg-surface focus:px-3 focus:py-2">
        Skip to content
      </a>
      <header className="border-b border-line bg-surface">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-x-4 gap-y-2 px-4 py-2.5">
          <Link to={paths.home()} className="text-fg no-underline hover:text-fg" aria-label="Tauline home">
            <Wordmark />
          </Link>
          <nav aria-label="Main" className="order-3 -mx-1 flex w-full gap-1 overflow-x-auto pb-1 sm:order-none sm:w-auto sm:pb-0">
            <NavItem to={paths.home()} end>
              Catalogue
            </NavItem>
            {me ? <NavItem to={paths.projects()}>My projects</NavItem> : null}
            <NavItem to={paths.apiDocs()}>API</NavItem>
            {isCuratorAnywhere(me) ? <NavItem to={paths.reviewQueue()}>Review queue</NavItem> : null}
            {me?.user.isAdmin ? <NavItem to={paths.adminUsers()}>Users</NavItem> : null}
            {me?.user.isAdmin ? <NavItem to={paths.adminMail()}>Outgoing mail</NavItem> : null}
          </nav>
          <div className="ml-auto flex items-center gap-2">
            <ThemeToggle />
            {me ? (
              <>
                {notices}
                <span className="hidden text-sm text-muted md:inline" data-testid="signed-in-as">
                  {me.user.name}
                  {me.user.isAdmin ? " · admin" : ""}
                </span>
                <button
                  type="button"
                  className={buttonClass("secondary", "sm")}
                  onClick={async () => {
                    await signOut();
                    navigate(paths.signIn());
                  }}
                >
                  Sign out
                </button>
              </>
            ) : me === null ? (
              <>
                <Link to={paths.signIn()} className={buttonClass("secondary", "sm")}>
                  Sign in
                </Link>
                <span className="hidden sm:inline-flex">
                  <Link to={paths.signUp()} className={buttonClass("primary", "sm")}>
                    Create account
                  </Link>
                </span>
              </>
            ) : null}
          </div>
        </div>
      </header>
      <main id="main" ref={mainRef} tabIndex={-1} className="mx-auto w-full max-w-7xl flex-1 px-4 py-6 outline-none sm:py-8">
        <Outlet />
      </main>
      <footer className="border-t border-line bg-surface">
        <div className="mx-auto flex max-w-7xl flex-col gap-1 px-4 py-4 text-sm text-muted sm:flex-row sm:justify-between">
          <p className="max-w-3xl">
            Derived diagnostics are scientific estimates, not guidance for navigation, offshore operations or safety. Defer to official forecasts, local
            regulations and qualified practice.
          </p>
          <p className="whitespace-nowrap">All times in UTC.</p>
        </div>
      </footer>
      <Toaster />
    </div>
  );
}

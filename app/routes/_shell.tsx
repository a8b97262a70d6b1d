import { Form, Link, NavLink, Outlet, useMatches, useRouteLoaderData } from "react-router";
import { ErrorPage } from "~/components/ErrorPage";
import { getSessionUser, type SessionUser } from "~/lib/auth/auth.server";
import { visibleNavItems } from "~/lib/nav";
import type { Route } from "./+types/_shell";

export async function loader({ request }: Route.LoaderArgs) {
  return { user: await getSessionUser(request) };
}

function useOptionalUser(): SessionUser | null {
  return (useRouteLoaderData("routes/_shell") as { user: SessionUser | null } | undefined)?.user ?? null;
}

function Header({ user }: { user: SessionUser | null }) {
  return (
    <header className="bg-night-900 text-night-100">
      <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-x-8 gap-y-2 px-6 py-3">
        <Link to="/" className="flex items-center gap-2 text-lg font-bold text-white no-underline hover:no-underline">
          <img src="/favicon.svg" alt="" className="h-7 w-7" />
          Nightshare
        </Link>
        <nav aria-label="Main" className="flex flex-wrap gap-1">
          {visibleNavItems(user).map((item) => (
            <NavLink
              key={item.to}
              to={item.to}
              className={({ isActive }) =>
                `rounded px-3 py-1.5 text-sm font-semibold no-underline hover:no-underline ${
                  isActive ? "bg-night-700 text-white" : "text-night-100 hover:bg-night-800"
                }`
              }
            >
              {item.label}
            </NavLink>
          ))}
        </nav>
        <div className="ml-auto flex items-center gap-3 text-sm">
          {user ? (
            <>
              <span title={user.email}>
                {user.name ?? user.email}
                {user.roles.length ? <span className="ml-2 text-night-100/70">({user.roles.join(", ")})</span> : null}
              </span>
              <Form method="post" action="/sign-out">
                <button type="submit" className="rounded border border-night-700 px-3 py-1 font-semibold text-white hover:bg-night-800">
                  Sign out
                </button>
              </Form>
            </>
          ) : (
            <Link to="/sign-in" className="rounded bg-dusk-500 px-3 py-1.5 font-semibold text-night-950 no-underline hover:bg-dusk-400 hover:no-underline">
              Sign in
            </Link>
          )}
        </div>
      </div>
    </header>
  );
}

/** A route that exports `handle = { wide: true }` (a wide table, e.g. the ranking board) gets the whole window. */
function useWide() {
  return useMatches().some((m) => (m.handle as { wide?: boolean } | undefined)?.wide === true);
}

export default function Shell({ loaderData }: Route.ComponentProps) {
  const wide = useWide();
  return (
    <>
      <Header user={loaderData.user} />
      <main className={`mx-auto px-6 py-8 ${wide ? "max-w-[1920px]" : "max-w-7xl"}`}>
        <Outlet />
      </main>
      <footer className="mx-auto max-w-7xl px-6 pb-10 text-xs text-slate-500">
        Nightshare · proposals, review and allocation of telescope time · Kestrel Ridge Observatory
      </footer>
    </>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  const user = useOptionalUser();
  return (
    <>
      <Header user={user} />
      <main className="mx-auto max-w-3xl px-6 py-12">
        <ErrorPage error={error} />
      </main>
    </>
  );
}

import { Link } from "react-router";
import { getSessionUser } from "~/lib/auth/auth.server";
import { Call } from "~/models/index.server";
import { callPhase } from "~/lib/call-phase";
import { currentCallsWhere } from "~/lib/call-phase.server";
import type { Route } from "./+types/_index";

export function meta() {
  return [{ title: "Nightshare · Kestrel Ridge Observatory" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  const user = await getSessionUser(request);
  const now = new Date();
  const calls = await Call.findAll({ where: currentCallsWhere(now), order: [["deadlineAt", "ASC"]] });
  return {
    user,
    calls: calls.map((c) => ({
      semesterCode: c.semesterCode,
      title: c.title,
      open: callPhase(c, now) === "open",
      opensAt: c.opensAt.toISOString(),
      deadlineAt: c.deadlineAt.toISOString(),
      semesterStart: c.semesterStart,
      semesterEnd: c.semesterEnd,
    })),
  };
}

const roleCards = {
  reviewer: { to: "/review", title: "Review", text: "Declare conflicts and score the proposals assigned to you." },
  chair: { to: "/committee", title: "Committee", text: "Assign reviewers, rank proposals on the ranking board and allocate hours." },
  admin: { to: "/admin", title: "Observatory office", text: "Telescopes, instruments, calls, people and their roles, decisions and charges." },
  observer: { to: "/admin/epochs", title: "Epoch log", text: "Record the executed and lost epochs of accepted astrometry programmes." },
} as const;

export default function Home({ loaderData }: Route.ComponentProps) {
  const { user, calls } = loaderData;
  return (
    <div className="space-y-8">
      <section className="rounded-xl bg-gradient-to-br from-night-900 to-night-800 px-8 py-10 text-night-100">
        <h1 className="text-3xl text-white">Telescope time, proposed and shared fairly</h1>
        <p className="mt-3 max-w-2xl text-lg">
          Nightshare computes the technical case with you — visibility at the site, exposure times, astrometric
          epochs — and carries each proposal through review, ranking and allocation at the Kestrel Ridge Observatory.
        </p>
        <div className="mt-6 flex gap-3">
          {user ? null : (
            <Link to="/sign-in" className="btn bg-dusk-500 text-night-950 hover:bg-dusk-400">Sign in to propose</Link>
          )}
          <Link to="/sky-tools" className="btn-quiet">Open the Sky tools</Link>
        </div>
      </section>

      <section>
        <h2>Calls for proposals</h2>
        <div className="mt-3 grid gap-4 md:grid-cols-2">
          {calls.length === 0 ? <p className="text-slate-600">No call is open or announced right now.</p> : null}
          {calls.map((call) => (
            <article key={call.semesterCode} className="card">
              <p className="text-sm font-semibold text-dusk-500">{call.open ? "Open" : "Announced"}</p>
              <h3 className="text-lg font-semibold">{call.title}</h3>
              <p className="mt-1 text-sm text-slate-600">
                Semester {call.semesterCode}: {call.semesterStart} to {call.semesterEnd}
              </p>
              <p className="mt-2 text-sm">
                {call.open ? "Deadline" : "Opens"}{" "}
                <time dateTime={call.open ? call.deadlineAt : call.opensAt}>
                  {(call.open ? call.deadlineAt : call.opensAt).slice(0, 16).replace("T", " ")} UTC
                </time>
              </p>
            </article>
          ))}
        </div>
      </section>

      {user && user.roles.length ? (
        <section>
          <h2>Your roles</h2>
          <div className="mt-3 grid gap-4 md:grid-cols-3">
            {user.roles.map((role) => (
              <Link key={role} to={roleCards[role].to} className="card block no-underline hover:border-night-700 hover:no-underline">
                <h3 className="font-semibold text-night-800">{roleCards[role].title}</h3>
                <p className="mt-1 text-sm text-slate-600">{roleCards[role].text}</p>
              </Link>
            ))}
          </div>
        </section>
      ) : null}
    </div>
  );
}

import { Link, useSearchParams } from "react-router";
import { Breadcrumbs } from "~/components/office/Breadcrumbs";
import { Saved } from "~/components/office/fields";
import { requireRole } from "~/lib/auth/auth.server";
import { callPhase } from "~/lib/call-phase";
import { listCalls, observatoryTimeZone } from "~/lib/office/office.server";
import { formatUtc } from "~/lib/format";
import { formatInZone } from "~/lib/zoned-time";
import type { Route } from "./+types/admin.calls._index";

export function meta() {
  return [{ title: "Calls · Observatory office · Nightshare" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  await requireRole(request, "admin");
  const [calls, timeZone] = await Promise.all([listCalls(), observatoryTimeZone()]);
  return { calls, timeZone, now: new Date().toISOString() };
}

const phaseClass = { announced: "bg-night-100 text-night-800", open: "bg-emerald-100 text-emerald-800", closed: "bg-slate-100 text-slate-600" } as const;
function status(call: { opensAt: string; deadlineAt: string }, now: string) {
  const label = callPhase(call, now);
  return { label, className: phaseClass[label] };
}

export default function Calls({ loaderData }: Route.ComponentProps) {
  const { calls, timeZone, now } = loaderData;
  const [params] = useSearchParams();
  return (
    <div className="space-y-6">
      <Breadcrumbs trail={[{ to: "/admin", label: "Observatory office" }, { label: "Calls" }]} />
      <div className="flex flex-wrap items-end justify-between gap-4">
        <div>
          <h1>Calls for proposals</h1>
          <p className="mt-1 text-sm text-slate-600">
            {`Times are the observatory's (${timeZone}) with UTC below.`} Each change is written to the audit log.
          </p>
        </div>
        <Link to="/admin/calls/new" className="btn">
          New call
        </Link>
      </div>
      {params.get("saved") ? <Saved>The call {params.get("saved")} was saved.</Saved> : null}
      <div className="overflow-x-auto rounded-lg border border-slate-200 bg-white">
        <table className="table-base">
          <thead>
            <tr>
              <th>Semester</th>
              <th>Title</th>
              <th>State</th>
              <th>Opens</th>
              <th>Deadline</th>
              <th>Semester dates</th>
              <th className="text-right">Telescopes</th>
              <th className="text-right">Hours offered</th>
              <th className="text-right">Page limit</th>
              <th className="text-right">Proposals</th>
            </tr>
          </thead>
          <tbody>
            {calls.map((c) => {
              const s = status(c, now);
              return (
                <tr key={c.id} className="hover:bg-night-50">
                  <td className="font-semibold">
                    <Link to={`/admin/calls/${c.id}`} aria-label={`Edit call ${c.semesterCode}`}>
                      {c.semesterCode}
                    </Link>{" "}
                    <Link to={`/admin/calls/${c.id}/decisions`} className="ml-2 text-xs font-normal">Decisions</Link>
                  </td>
                  <td>{c.title}</td>
                  <td>
                    <span className={`rounded-full px-2 py-0.5 text-xs font-semibold ${s.className}`}>{s.label}</span>
                  </td>
                  {[c.opensAt, c.deadlineAt].map((at) => (
                    <td key={at} className="tabular-nums whitespace-nowrap">
                      {formatInZone(at, timeZone)}
                      <span className="block text-xs text-slate-500">{formatUtc(at)}</span>
                    </td>
                  ))}
                  <td className="tabular-nums whitespace-nowrap">
                    {c.semesterStart} to {c.semesterEnd}
                  </td>
                  <td className="text-right tabular-nums">{c.telescopes}</td>
                  <td className="text-right tabular-nums">{c.hoursOffered.toLocaleString("en-GB")}</td>
                  <td className="text-right tabular-nums">{c.pageLimit}</td>
                  <td className="text-right tabular-nums">{c.proposals}</td>
                </tr>
              );
            })}
            {calls.length === 0 ? (
              <tr>
                <td colSpan={10} className="py-6 text-center text-slate-500">No call yet.</td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </div>
    </div>
  );
}

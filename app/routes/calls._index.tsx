import { Link } from "react-router";
import { Countdown } from "~/components/Countdown";
import { moonCategories } from "~/lib/domain";
import { listPublicCalls } from "~/lib/office/office.server";
import { formatUtc } from "~/lib/format";
import { formatMoney } from "~/lib/payments/money";
import { formatInZone } from "~/lib/zoned-time";
import type { Route } from "./+types/calls._index";

export function meta() {
  return [{ title: "Open calls · Nightshare" }];
}

export async function loader() {
  const now = new Date();
  return { calls: await listPublicCalls({ now }), now: now.toISOString() };
}

const moonStyle = {
  dark: { label: "Dark", bar: "bg-night-900" },
  grey: { label: "Grey", bar: "bg-night-700/60" },
  bright: { label: "Bright", bar: "bg-dusk-400" },
} as const;

type PublicCall = Route.ComponentProps["loaderData"]["calls"][number];

function OfferedHours({ call }: { call: PublicCall }) {
  const max = Math.max(1, ...call.telescopes.flatMap((t) => moonCategories.map((m) => t.hours[m])));
  return (
    <table className="table-base">
      <caption className="sr-only">Hours offered in {call.semesterCode} per telescope and moon category</caption>
      <thead>
        <tr>
          <th>Telescope</th>
          {moonCategories.map((m) => (
            <th key={m} className="w-1/4">
              {moonStyle[m].label} (h)
            </th>
          ))}
        </tr>
      </thead>
      <tbody>
        {call.telescopes.map((t) => (
          <tr key={t.id}>
            <th scope="row" className="bg-white font-semibold">
              {t.name}
              <span className="block text-xs font-normal text-slate-500">
                {t.apertureM} m · {t.siteName}
              </span>
            </th>
            {moonCategories.map((m) => (
              <td key={m}>
                <div className="flex items-center gap-2">
                  <span className="w-10 text-right tabular-nums">{t.hours[m]}</span>
                  <span className="h-2.5 flex-1 rounded bg-slate-100" aria-hidden="true">
                    <span className={`block h-2.5 rounded ${moonStyle[m].bar}`} style={{ width: `${(100 * t.hours[m]) / max}%` }} />
                  </span>
                </div>
              </td>
            ))}
          </tr>
        ))}
        {call.telescopes.length === 0 ? (
          <tr>
            <td colSpan={4} className="text-slate-500">The office has not yet said which telescopes this call offers.</td>
          </tr>
        ) : null}
      </tbody>
    </table>
  );
}

function CallCard({ call, now }: { call: PublicCall; now: string }) {
  const open = call.status === "open";
  const moment = open ? call.deadlineAt : call.opensAt;
  const zones = call.timeZones.length ? call.timeZones : ["UTC"];
  return (
    <article className="card space-y-5" aria-labelledby={`call-${call.semesterCode}`}>
      <div className="flex flex-wrap items-start justify-between gap-4">
        <div>
          <p className={`text-sm font-semibold tracking-wide uppercase ${open ? "text-emerald-700" : "text-dusk-500"}`}>
            {open ? "Open" : "Announced"}
          </p>
          <h2 id={`call-${call.semesterCode}`} className="text-xl">
            {call.title}
          </h2>
          <p className="mt-1 text-sm text-slate-600">
            Semester {call.semesterCode}: nights of {call.semesterStart} to {call.semesterEnd} · science case at most {call.pageLimit}{" "}
            page{call.pageLimit === 1 ? "" : "s"}
          </p>
        </div>
        {open ? (
          <Link to={`/proposals/new?call=${call.semesterCode}`} className="btn">
            Start a proposal
          </Link>
        ) : null}
      </div>

      <div className="grid gap-4 rounded-lg bg-night-50 p-4 md:grid-cols-[auto_1fr]">
        <div>
          <p className="text-sm font-semibold text-slate-700">{open ? "Deadline in" : "Opens in"}</p>
          <Countdown until={moment} renderedAt={now} label={`${open ? "Time left until the deadline" : "Time until the call opens"} of ${call.semesterCode}`} />
        </div>
        <dl className="grid gap-x-6 gap-y-1 text-sm sm:grid-cols-[auto_1fr]">
          <dt className="font-semibold text-slate-700">{open ? "Deadline (UTC)" : "Opens (UTC)"}</dt>
          <dd className="tabular-nums">
            <time dateTime={moment}>{formatUtc(moment)}</time>
          </dd>
          {zones.map((zone) => (
            <div key={zone} className="contents">
              <dt className="font-semibold text-slate-700">{`Observatory time (${zone})`}</dt>
              <dd className="tabular-nums">{formatInZone(moment, zone)}</dd>
            </div>
          ))}
          {open ? null : (
            <>
              <dt className="font-semibold text-slate-700">Deadline</dt>
              <dd className="tabular-nums">
                {formatUtc(call.deadlineAt)} · {zones.map((z) => formatInZone(call.deadlineAt, z)).join(" · ")}
              </dd>
            </>
          )}
        </dl>
      </div>

      <section aria-label={`Hours offered in ${call.semesterCode}`}>
        <h3 className="mb-2 font-semibold text-night-900">Hours offered</h3>
        <OfferedHours call={call} />
      </section>

      {call.accessFeePerHourCents || call.pageChargeCents ? (
        <p className="text-sm text-slate-600">
          Charges:{" "}
          {call.accessFeePerHourCents ? `${formatMoney(call.accessFeePerHourCents, call.currency)} per allocated hour for institutions outside the consortium` : null}
          {call.accessFeePerHourCents && call.pageChargeCents ? "; " : null}
          {call.pageChargeCents ? `page charge ${formatMoney(call.pageChargeCents, call.currency)} per page of the programme's data-release paper in the observatory's publication` : null}.
        </p>
      ) : null}
    </article>
  );
}

export default function OpenCalls({ loaderData }: Route.ComponentProps) {
  const { calls, now } = loaderData;
  return (
    <div className="space-y-6">
      <div>
        <h1>Open calls</h1>
        <p className="mt-1 text-slate-600">Calls for proposals that are open now or announced, with the time offered on each telescope.</p>
      </div>
      {calls.length === 0 ? <p className="card text-slate-600">No call is open or announced right now.</p> : null}
      {calls.map((call) => (
        <CallCard key={call.id} call={call} now={now} />
      ))}
    </div>
  );
}

import {
  createColumnHelper,
  getCoreRowModel,
  getFilteredRowModel,
  getPaginationRowModel,
  getSortedRowModel,
  useReactTable,
  type SortingState,
} from "@tanstack/react-table";
import { SortableTable } from "~/components/SortableTable";
import { useMemo, useState } from "react";
import { data, useFetcher } from "react-router";
import { requireRole } from "~/lib/auth/auth.server";
import { fieldErrors, readForm } from "~/lib/forms";
import { adminUserActionSchema } from "~/lib/schemas/roles";
import { changeRole, listUsersWithRoles, RoleChangeRefused, signOutEverywhere } from "~/lib/auth/users.server";
import { grantableRoles, type GrantableRole } from "~/lib/domain";
import type { Route } from "./+types/admin.users";

export function meta() {
  return [{ title: "People and roles · Nightshare" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  const actor = await requireRole(request, "admin");
  return { users: await listUsersWithRoles(), actorId: actor.id };
}

export async function action({ request }: Route.ActionArgs) {
  const actor = await requireRole(request, "admin");
  const parsed = adminUserActionSchema.safeParse(Object.fromEntries(await readForm(request)));
  if (!parsed.success) return data({ ok: false as const, errors: fieldErrors(parsed.error) }, { status: 400 });
  try {
    if (parsed.data.intent === "sign-out-everywhere") {
      const result = await signOutEverywhere({ actor, userId: parsed.data.userId });
      return { ok: true as const, ...result, ...parsed.data };
    }
    const result = await changeRole({ actor, ...parsed.data });
    return { ok: true as const, ...result, ...parsed.data };
  } catch (error) {
    if (error instanceof RoleChangeRefused) return data({ ok: false as const, errors: { form: error.message } }, { status: 400 });
    throw error;
  }
}

type UserRow = Awaited<ReturnType<typeof loader>>["users"][number];
const column = createColumnHelper<UserRow>();

function RoleToggle({ user, role, self }: { user: UserRow; role: GrantableRole; self: boolean }) {
  const fetcher = useFetcher<typeof action>();
  const pending = fetcher.formData?.get("intent");
  const has = pending ? pending === "grant" : user.roles.includes(role);
  const error = fetcher.data && !fetcher.data.ok ? Object.values(fetcher.data.errors)[0] : null;
  return (
    <fetcher.Form method="post" className="inline">
      <input type="hidden" name="userId" value={user.id} />
      <input type="hidden" name="role" value={role} />
      <input type="hidden" name="intent" value={has ? "revoke" : "grant"} />
      <button
        type="submit"
        aria-pressed={has}
        aria-label={`${has ? "Revoke" : "Grant"} ${role} for ${user.email}`}
        disabled={self && role === "admin" && has}
        title={self && role === "admin" ? "You cannot revoke your own admin role" : undefined}
        className={`rounded-full border px-2.5 py-0.5 text-xs font-semibold ${
          has ? "border-night-800 bg-night-800 text-white" : "border-slate-300 bg-white text-slate-500 hover:border-night-700"
        } disabled:cursor-not-allowed disabled:opacity-60`}
      >
        {role}
      </button>
      {error ? <span role="alert" className="ml-1 text-xs text-red-700">{error}</span> : null}
    </fetcher.Form>
  );
}

function SignOutEverywhere({ user }: { user: UserRow }) {
  const fetcher = useFetcher<typeof action>();
  const done = fetcher.data?.ok && "sessionsEnded" in fetcher.data ? fetcher.data : null;
  const error = fetcher.data && !fetcher.data.ok ? Object.values(fetcher.data.errors)[0] : null;
  const sessions = done ? 0 : user.activeSessions;
  return (
    <fetcher.Form
      method="post"
      className="flex flex-wrap items-center gap-2"
      onSubmit={(event) => {
        if (!window.confirm(`Sign ${user.email} out of every browser? They can sign in again with a new code.`)) event.preventDefault();
      }}
    >
      <input type="hidden" name="userId" value={user.id} />
      <input type="hidden" name="intent" value="sign-out-everywhere" />
      <span className="text-xs text-slate-600">{sessions === 1 ? "1 session" : `${sessions} sessions`}</span>
      <button
        type="submit"
        className="btn-quiet text-xs"
        aria-label={`Sign ${user.email} out everywhere`}
        disabled={fetcher.state !== "idle"}
      >
        Sign this person out everywhere
      </button>
      {done ? <span role="status" className="text-xs text-emerald-700">Signed out ({done.sessionsEnded} ended)</span> : null}
      {error ? <span role="alert" className="text-xs text-red-700">{error}</span> : null}
    </fetcher.Form>
  );
}

export default function AdminUsers({ loaderData }: Route.ComponentProps) {
  const { users, actorId } = loaderData;
  const [sorting, setSorting] = useState<SortingState>([{ id: "email", desc: false }]);
  const [globalFilter, setGlobalFilter] = useState("");
  const [roleFilter, setRoleFilter] = useState<"" | GrantableRole | "none">("");
  const rows = useMemo(
    () =>
      users.filter((u) =>
        roleFilter === "" ? true : roleFilter === "none" ? u.roles.length === 0 : u.roles.includes(roleFilter),
      ),
    [users, roleFilter],
  );
  const columns = useMemo(
    () => [
      column.accessor("email", { header: "E-mail" }),
      column.accessor("name", { header: "Name" }),
      column.accessor("institution", { header: "Institution" }),
      column.accessor("isMemberInstitution", {
        header: "Member institution",
        cell: (info) => (info.getValue() ? "yes" : "no"),
      }),
      column.accessor("lastSignInAt", {
        header: "Last sign-in (UTC)",
        cell: (info) => info.getValue()?.slice(0, 16).replace("T", " ") ?? "never",
      }),
      column.accessor((u) => u.roles.join(" "), {
        id: "roles",
        header: "Roles",
        cell: (info) => (
          <div className="flex flex-wrap gap-1">
            {grantableRoles.map((role) => (
              <RoleToggle key={role} user={info.row.original} role={role} self={info.row.original.id === actorId} />
            ))}
          </div>
        ),
      }),
      column.accessor("activeSessions", {
        header: "Signed in",
        cell: (info) => <SignOutEverywhere user={info.row.original} />,
      }),
    ],
    [actorId],
  );
  const table = useReactTable({
    data: rows,
    columns,
    state: { sorting, globalFilter },
    onSortingChange: setSorting,
    onGlobalFilterChange: setGlobalFilter,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
    getPaginationRowModel: getPaginationRowModel(),
    initialState: { pagination: { pageSize: 20 } },
  });
  const { pageIndex } = table.getState().pagination;
  return (
    <div className="space-y-4">
      <div>
        <h1>People and roles</h1>
        <p className="mt-1 text-sm text-slate-600">
          Every account can propose. Reviewer, chair and admin are granted separately; none implies another. Changing a
          person&apos;s roles signs them out of every browser. Each change is written to the audit log.
        </p>
      </div>
      <div className="flex flex-wrap items-end gap-4">
        <div className="w-72">
          <label htmlFor="user-filter">Find</label>
          <input
            id="user-filter"
            className="input"
            placeholder="Name, e-mail or institution"
            value={globalFilter}
            onChange={(e) => setGlobalFilter(e.target.value)}
          />
        </div>
        <div>
          <label htmlFor="role-filter">Role</label>
          <select id="role-filter" className="input" value={roleFilter} onChange={(e) => setRoleFilter(e.target.value as typeof roleFilter)}>
            <option value="">Any</option>
            {grantableRoles.map((r) => (
              <option key={r} value={r}>{r}</option>
            ))}
            <option value="none">No granted role</option>
          </select>
        </div>
        <p className="ml-auto text-sm text-slate-600">{table.getFilteredRowModel().rows.length} of {users.length} accounts</p>
      </div>
      <SortableTable table={table} empty="No account matches." />
      <div className="flex items-center gap-2 text-sm">
        <button type="button" className="btn-quiet" onClick={() => table.previousPage()} disabled={!table.getCanPreviousPage()}>
          Previous
        </button>
        <span>
          Page {pageIndex + 1} of {Math.max(1, table.getPageCount())}
        </span>
        <button type="button" className="btn-quiet" onClick={() => table.nextPage()} disabled={!table.getCanNextPage()}>
          Next
        </button>
      </div>
    </div>
  );
}

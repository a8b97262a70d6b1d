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
import { z } from "zod";
import { RoleToggle, SignOutEverywhere } from "~/components/office/UserControls";
import { formAction, intent } from "~/lib/actions.server";
import { requireRole } from "~/lib/auth/auth.server";
import { roleField, userIdField } from "~/lib/schemas/roles";
import { changeRole, listUsersWithRoles, signOutEverywhere, type UserWithRoles } from "~/lib/auth/users.server";
import { grantableRoles, type GrantableRole } from "~/lib/domain";
import type { Route } from "./+types/admin.users";

export function meta() {
  return [{ title: "People and roles · Nightshare" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  const actor = await requireRole(request, "admin");
  return { users: await listUsersWithRoles(), actorId: actor.id };
}

const userFields = z.object({ userId: userIdField });
const roleFields = userFields.extend({ role: roleField });
const userIntents = z.discriminatedUnion("intent", [intent("grant", roleFields), intent("revoke", roleFields), intent("sign-out-everywhere", userFields)]);

export async function action({ request }: Route.ActionArgs) {
  const actor = await requireRole(request, "admin");
  return formAction(request, userIntents, async (input) => {
    switch (input.intent) {
      case "sign-out-everywhere":
        return { ok: true as const, ...(await signOutEverywhere({ actor, userId: input.userId })), ...input };
      case "grant":
      case "revoke":
        return { ok: true as const, ...(await changeRole({ actor, ...input })), ...input };
    }
  });
}

const column = createColumnHelper<UserWithRoles>();

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

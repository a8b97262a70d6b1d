// The office's controls on one person of /admin/users: a role toggle and "sign out everywhere".
import { useFetcher } from "react-router";
import type { UserWithRoles } from "~/lib/auth/users.server";
import type { GrantableRole } from "~/lib/domain";
import type { ActionFailure } from "~/lib/forms";

/** What the page's action answers about one person. */
export type UserActionAnswer =
  | ActionFailure
  | { ok: true; intent: "grant" | "revoke"; userId: number; role: GrantableRole; changed: boolean; email: string }
  | { ok: true; intent: "sign-out-everywhere"; userId: number; email: string; sessionsEnded: number };

const firstError = (answer: UserActionAnswer | undefined) => (answer && !answer.ok ? Object.values(answer.errors)[0] : null);

export function RoleToggle({ user, role, self }: { user: UserWithRoles; role: GrantableRole; self: boolean }) {
  const fetcher = useFetcher<UserActionAnswer>();
  const pending = fetcher.formData?.get("intent");
  const has = pending ? pending === "grant" : user.roles.includes(role);
  const error = firstError(fetcher.data);
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

export function SignOutEverywhere({ user }: { user: UserWithRoles }) {
  const fetcher = useFetcher<UserActionAnswer>();
  const done = fetcher.data?.ok && fetcher.data.intent === "sign-out-everywhere" ? fetcher.data : null;
  const error = firstError(fetcher.data);
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

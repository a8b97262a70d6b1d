// Who keeps the epoch log: the observatory office (admin) and its observers.
import type { GrantableRole } from "~/lib/domain";

export const EPOCH_OFFICE_ROLES = ["admin", "observer"] as const satisfies readonly GrantableRole[];

export function isEpochOffice(user: { roles: readonly string[] }) {
  return user.roles.some((r) => (EPOCH_OFFICE_ROLES as readonly string[]).includes(r));
}

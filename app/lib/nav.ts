import type { GrantableRole } from "./domain";

export interface NavItem {
  to: string;
  label: string;
  /** shown only to holders of this role (the server checks again on every request) */
  role?: GrantableRole;
  signedIn?: boolean;
}

export const navItems: NavItem[] = [
  { to: "/calls", label: "Open calls" },
  { to: "/sky-tools", label: "Sky tools" },
  { to: "/proposals", label: "My proposals", signedIn: true },
  { to: "/review", label: "Review", role: "reviewer" },
  { to: "/committee", label: "Committee", role: "chair" },
  { to: "/admin", label: "Office", role: "admin" },
  // an observer who is not in the office reaches the epoch log only
  { to: "/admin/epochs", label: "Epoch log", role: "observer" },
];

export function visibleNavItems(user: { roles: GrantableRole[] } | null) {
  return navItems.filter((item) => {
    if (item.role === "observer" && user?.roles.includes("admin")) return false;
    return item.role ? Boolean(user?.roles.includes(item.role)) : item.signedIn ? Boolean(user) : true;
  });
}

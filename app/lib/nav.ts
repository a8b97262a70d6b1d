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
];

export function visibleNavItems(user: { roles: GrantableRole[] } | null) {
  return navItems.filter((item) => (item.role ? Boolean(user?.roles.includes(item.role)) : item.signedIn ? Boolean(user) : true));
}

import type { Href } from "expo-router";
import type { Role } from "@/schemas/account";
import { roles, staffRoles } from "./vocabulary";

export interface NavItem {
  href: Extract<Href, string>;
  label: string;
  /** Short label for the phone's bottom bar. */
  short: string;
  /** Shown only to these roles (admins see everything); undefined means everyone. */
  roles?: Role[];
  /** Shown only to visitors who are not signed in. */
  visitorsOnly?: boolean;
  /** Whether this item is active for a pathname. */
  match: (pathname: string) => boolean;
}

export const navItems: NavItem[] = [
  { href: "/", label: "Evidence", short: "Evidence", match: (p) => p === "/" },
  { href: "/datasets", label: "Datasets", short: "Datasets", match: (p) => p.startsWith("/datasets") },
  { href: "/curate", label: "Workbench", short: "Workbench", roles: [...staffRoles], match: (p) => p.startsWith("/curate") },
  { href: "/admin", label: "Admin", short: "Admin", roles: ["admin"], match: (p) => p.startsWith("/admin") },
  { href: "/account", label: "Account", short: "Account", roles: [...roles], match: (p) => p.startsWith("/account") },
  { href: "/developers", label: "Developers", short: "API", match: (p) => p.startsWith("/developers") },
  {
    href: "/sign-in",
    label: "Sign in",
    short: "Sign in",
    visitorsOnly: true,
    match: (p) => ["/sign-in", "/sign-up", "/verify", "/forgot-password", "/reset-password", "/invite"].some((x) => p.startsWith(x)),
  },
];

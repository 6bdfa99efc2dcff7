import type { Permission } from "@/lib/auth/permissions";

export interface NavItem {
  href: string;
  label: string;
  /** Shown only to members whose role has this permission. */
  permission?: Permission;
  /** Shown only when the server runs with the development mail catcher. */
  devMailOnly?: boolean;
}

// Only pages that exist are listed.
export const NAV_ITEMS: readonly NavItem[] = [
  { href: "/", label: "Overview" },
  { href: "/datasets", label: "Datasets", permission: "jobs:read" },
  { href: "/jobs", label: "Jobs", permission: "jobs:read" },
  { href: "/keys", label: "API keys", permission: "keys:manage" },
  { href: "/webhooks", label: "Webhooks", permission: "keys:manage" },
  { href: "/signing-keys", label: "Signing keys", permission: "keys:manage" },
  { href: "/members", label: "Members", permission: "members:manage" },
  { href: "/audit", label: "Audit log", permission: "audit:read" },
  { href: "/dev/mail", label: "Dev mail", permission: "mail:read-dev", devMailOnly: true },
];

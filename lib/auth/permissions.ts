// The one permission table: what each membership role and each API-key scope may do.
// Both the console (to show or hide actions) and the API handlers (to decide) ask `can()` / `scopeCan()`.

export const ROLES = ["admin", "analyst", "auditor"] as const;
export type Role = (typeof ROLES)[number];

export const PERMISSIONS = [
  "keys:manage",
  "members:manage",
  "audit:read",
  "datasets:write",
  "jobs:write",
  "jobs:read",
  "results:read",
  "provenance:read",
  "mail:read-dev",
] as const;
export type Permission = (typeof PERMISSIONS)[number];

export const ROLE_PERMISSIONS: Record<Role, Permission[]> = {
  admin: [...PERMISSIONS],
  analyst: ["datasets:write", "jobs:write", "jobs:read", "results:read"],
  auditor: ["audit:read", "jobs:read", "results:read", "provenance:read"],
};

export function can(role: Role, p: Permission): boolean {
  return ROLE_PERMISSIONS[role].includes(p);
}

export const SCOPES = ["datasets:write", "jobs:write", "jobs:read", "results:read", "provenance:read", "admin"] as const;
export type Scope = (typeof SCOPES)[number];

// A key scope grants the permission of the same name; `admin` grants what an admin member may do,
// so an org can script its own key and member management.
export const SCOPE_PERMISSIONS: Record<Scope, Permission[]> = {
  "datasets:write": ["datasets:write"],
  "jobs:write": ["jobs:write"],
  "jobs:read": ["jobs:read"],
  "results:read": ["results:read"],
  "provenance:read": ["provenance:read"],
  admin: [...PERMISSIONS],
};

export function scopeCan(scopes: readonly Scope[], p: Permission): boolean {
  return scopes.some((s) => SCOPE_PERMISSIONS[s].includes(p));
}

export function permissionsOfRole(role: Role): Permission[] {
  return [...ROLE_PERMISSIONS[role]];
}

export function permissionsOfScopes(scopes: readonly Scope[]): Permission[] {
  return PERMISSIONS.filter((p) => scopeCan(scopes, p));
}

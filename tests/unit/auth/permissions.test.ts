import { describe, expect, it } from "vitest";
import { PERMISSIONS, ROLES, ROLE_PERMISSIONS, SCOPES, can, permissionsOfScopes, scopeCan } from "@/lib/auth/permissions";

// The table is the product decision of the platform contract (derived); these checks pin it.
describe("permissions", () => {
  it("can() gives an admin every permission (platform contract)", () => {
    for (const p of PERMISSIONS) expect(can("admin", p)).toBe(true);
  });

  it("can() lets an analyst write datasets and jobs but not manage keys, members or read the audit log (platform contract)", () => {
    expect(ROLE_PERMISSIONS.analyst.sort()).toEqual(["datasets:write", "jobs:read", "jobs:write", "results:read"]);
    expect(can("analyst", "keys:manage")).toBe(false);
    expect(can("analyst", "audit:read")).toBe(false);
  });

  it("can() lets an auditor read the audit log, jobs, results and provenance and write nothing (platform contract)", () => {
    expect(ROLE_PERMISSIONS.auditor.sort()).toEqual(["audit:read", "jobs:read", "provenance:read", "results:read"]);
    for (const p of PERMISSIONS) if (p.endsWith(":write") || p.endsWith(":manage")) expect(can("auditor", p)).toBe(false);
  });

  it("every non-admin role has a strict subset of the admin's permissions (derived invariant)", () => {
    for (const r of ROLES) for (const p of ROLE_PERMISSIONS[r]) expect(can("admin", p)).toBe(true);
  });

  it("scopeCan() grants a scope only its own permission, and the admin scope everything (platform contract)", () => {
    for (const s of SCOPES) {
      if (s === "admin") expect(permissionsOfScopes([s])).toEqual([...PERMISSIONS]);
      else expect(permissionsOfScopes([s])).toEqual([s]);
    }
    expect(scopeCan(["jobs:read"], "jobs:write")).toBe(false);
    expect(scopeCan([], "jobs:read")).toBe(false);
  });
});

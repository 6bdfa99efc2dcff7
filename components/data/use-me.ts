"use client";

import { useQuery } from "@tanstack/react-query";
import type { MeBody } from "@/lib/api/schemas";
import { can, type Permission } from "@/lib/auth/permissions";
import { api } from "@/components/data/api";

export const ME_QUERY_KEY = ["me"] as const;

/** Who the browser's session is: user, org, role and permissions (GET /api/v1/me). */
export function useMe() {
  return useQuery({ queryKey: ME_QUERY_KEY, queryFn: () => api<MeBody>("/me"), staleTime: 60_000 });
}

/**
 * Whether the signed-in member may do `p`, asked of the one permission table. Only hides or disables
 * controls: the API decides again on every request.
 */
export function allows(me: MeBody | undefined, p: Permission): boolean {
  if (me === undefined) return false;
  return me.role !== undefined ? can(me.role, p) : me.permissions.includes(p);
}

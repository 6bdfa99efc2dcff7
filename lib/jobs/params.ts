// The {id} of a /api/v1/{datasets|jobs}/{id}… route: a malformed id is as unknown as a missing one (404, not 422).
import { ApiError } from "@/lib/api/problem";
import { IdParams } from "@/lib/jobs/schemas";

export function idParamOf(params: unknown, what: "job" | "dataset"): string {
  const p = IdParams.safeParse(params);
  if (!p.success) throw new ApiError("not-found", `No such ${what}.`);
  return p.data.id;
}

import type { JobKind } from "@/components/jobs/bodies";

// Short names for tables; the new-analysis form shows each kind's full summary beside it.
export const KIND_LABELS: Record<JobKind, string> = {
  drainage: "Drainage",
  surface: "Surface dimension",
  network: "Network",
  line: "Line dimension",
};

// The handler of each job kind (the worker's only way to a pipeline).
import type { JobKind } from "@/lib/jobs/kinds";
import type { JobHandler } from "@/jobs/handlers/types";
import { drainage } from "@/jobs/handlers/drainage";
import { line } from "@/jobs/handlers/line";
import { network } from "@/jobs/handlers/network";
import { surface } from "@/jobs/handlers/surface";

export const HANDLERS: Record<JobKind, JobHandler> = { drainage, surface, network, line };

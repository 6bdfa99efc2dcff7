import { Badge, type BadgeTone } from "@/components/ui/badge";
import type { JobBody, JobStatus } from "@/components/jobs/bodies";

const TONES: Record<JobStatus, BadgeTone> = {
  queued: "neutral",
  running: "warn",
  succeeded: "good",
  failed: "bad",
  cancelled: "neutral",
};

export function JobStatusBadge({ job }: { job: Pick<JobBody, "status" | "cancelRequested"> }) {
  const cancelling = job.cancelRequested && (job.status === "queued" || job.status === "running");
  return <Badge tone={TONES[job.status]}>{cancelling ? `${job.status}, cancelling` : job.status}</Badge>;
}

/** Progress 0–1 as a bar with its percentage in words (the bar alone would carry meaning by colour and length only). */
export function ProgressBar({ value, label }: { value: number; label: string }) {
  const percent = Math.round(Math.min(1, Math.max(0, value)) * 100);
  return (
    <div className="flex min-w-[7rem] items-center gap-2">
      <div
        role="progressbar"
        aria-label={label}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={percent}
        className="h-1.5 flex-1 overflow-hidden rounded-full bg-paper-sunk"
      >
        <div className="h-full rounded-full bg-lichen transition-[width] duration-500" style={{ width: `${percent}%` }} />
      </div>
      <span className="w-9 text-right text-xs tabular-nums text-graphite-muted">{percent}%</span>
    </div>
  );
}

/** Seconds as "0.8 s", "42 s", "3 min 5 s". */
export function formatDuration(seconds: number | null): string {
  if (seconds === null) return "—";
  if (seconds < 10) return `${seconds.toFixed(1)} s`;
  if (seconds < 60) return `${Math.round(seconds)} s`;
  const m = Math.floor(seconds / 60);
  return `${m} min ${Math.round(seconds - m * 60)} s`;
}

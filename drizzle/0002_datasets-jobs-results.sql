CREATE TYPE "public"."dataset_format" AS ENUM('geotiff', 'geojson', 'zip');--> statement-breakpoint
CREATE TYPE "public"."job_status" AS ENUM('queued', 'running', 'succeeded', 'failed', 'cancelled');--> statement-breakpoint
CREATE TABLE "datasets" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"org_id" uuid NOT NULL,
	"name" text NOT NULL,
	"format" "dataset_format" NOT NULL,
	"media_type" text NOT NULL,
	"sha256" text NOT NULL,
	"size_bytes" bigint NOT NULL,
	"storage_key" text NOT NULL,
	"metadata" jsonb NOT NULL,
	"created_by" jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "datasets_orgId_sha256_unique" UNIQUE("org_id","sha256")
);
--> statement-breakpoint
CREATE TABLE "idempotency_keys" (
	"org_id" uuid NOT NULL,
	"principal" text NOT NULL,
	"key" text NOT NULL,
	"fingerprint" text NOT NULL,
	"response_status" integer,
	"response_body" jsonb,
	"response_headers" jsonb,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	CONSTRAINT "idempotency_keys_org_id_principal_key_pk" PRIMARY KEY("org_id","principal","key")
);
--> statement-breakpoint
CREATE TABLE "job_results" (
	"job_id" uuid PRIMARY KEY NOT NULL,
	"summary" jsonb NOT NULL,
	"timings_s" jsonb NOT NULL,
	"artifacts" jsonb NOT NULL,
	"software_version" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "jobs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"org_id" uuid NOT NULL,
	"dataset_id" uuid,
	"kind" text NOT NULL,
	"params" jsonb NOT NULL,
	"cache_key" text NOT NULL,
	"status" "job_status" DEFAULT 'queued' NOT NULL,
	"stage" text,
	"progress" real DEFAULT 0 NOT NULL,
	"error" jsonb,
	"attempts" integer DEFAULT 0 NOT NULL,
	"cached_from_job_id" uuid,
	"submitted_by" jsonb NOT NULL,
	"worker_id" text,
	"heartbeat_at" timestamp with time zone,
	"cancel_requested_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"started_at" timestamp with time zone,
	"finished_at" timestamp with time zone,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "rate_limit_counters" (
	"bucket" text PRIMARY KEY NOT NULL,
	"window_started_at" timestamp with time zone NOT NULL,
	"count" integer DEFAULT 0 NOT NULL
);
--> statement-breakpoint
ALTER TABLE "datasets" ADD CONSTRAINT "datasets_org_id_organisations_id_fk" FOREIGN KEY ("org_id") REFERENCES "public"."organisations"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "idempotency_keys" ADD CONSTRAINT "idempotency_keys_org_id_organisations_id_fk" FOREIGN KEY ("org_id") REFERENCES "public"."organisations"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "job_results" ADD CONSTRAINT "job_results_job_id_jobs_id_fk" FOREIGN KEY ("job_id") REFERENCES "public"."jobs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "jobs" ADD CONSTRAINT "jobs_org_id_organisations_id_fk" FOREIGN KEY ("org_id") REFERENCES "public"."organisations"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "jobs" ADD CONSTRAINT "jobs_dataset_id_datasets_id_fk" FOREIGN KEY ("dataset_id") REFERENCES "public"."datasets"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "datasets_org_id_created_at_id_index" ON "datasets" USING btree ("org_id","created_at","id");--> statement-breakpoint
CREATE INDEX "idempotency_keys_expires_at_index" ON "idempotency_keys" USING btree ("expires_at");--> statement-breakpoint
CREATE INDEX "jobs_org_id_created_at_id_index" ON "jobs" USING btree ("org_id","created_at","id");--> statement-breakpoint
CREATE INDEX "jobs_org_id_status_index" ON "jobs" USING btree ("org_id","status");--> statement-breakpoint
CREATE INDEX "jobs_dataset_id_index" ON "jobs" USING btree ("dataset_id");--> statement-breakpoint
CREATE INDEX "jobs_cache_key_index" ON "jobs" USING btree ("cache_key");
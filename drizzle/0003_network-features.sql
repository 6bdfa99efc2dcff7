CREATE TABLE "network_features" (
	"job_id" uuid NOT NULL,
	"feature_id" integer NOT NULL,
	"downstream" integer,
	"strahler_order" integer NOT NULL,
	"shreve_magnitude" double precision NOT NULL,
	"length_m" double precision NOT NULL,
	"drop_m" double precision,
	"area_m2" double precision,
	"geom" geometry(LineString,4326) NOT NULL,
	CONSTRAINT "network_features_job_id_feature_id_pk" PRIMARY KEY("job_id","feature_id")
);
--> statement-breakpoint
ALTER TABLE "network_features" ADD CONSTRAINT "network_features_job_id_jobs_id_fk" FOREIGN KEY ("job_id") REFERENCES "public"."jobs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "network_features_geom_index" ON "network_features" USING gist ("geom");--> statement-breakpoint
CREATE INDEX "network_features_job_id_strahler_order_index" ON "network_features" USING btree ("job_id","strahler_order");
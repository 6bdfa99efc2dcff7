-- Hand-written (drizzle-kit generate --custom): privileges of the application role and the append-only audit log.
-- Roles rillscale_owner / rillscale_app are cluster-wide and created by db/cluster.ts; PostGIS is created by the
-- superuser when the database is made (db/cluster.ts ensureDatabase), so here it is only asserted.
CREATE EXTENSION IF NOT EXISTS postgis;
--> statement-breakpoint
GRANT USAGE ON SCHEMA public TO rillscale_app;
--> statement-breakpoint
GRANT SELECT, INSERT, UPDATE, DELETE ON ALL TABLES IN SCHEMA public TO rillscale_app;
--> statement-breakpoint
GRANT USAGE, SELECT ON ALL SEQUENCES IN SCHEMA public TO rillscale_app;
--> statement-breakpoint
-- Tables added by later migrations get the same rights without repeating these grants.
ALTER DEFAULT PRIVILEGES IN SCHEMA public GRANT SELECT, INSERT, UPDATE, DELETE ON TABLES TO rillscale_app;
--> statement-breakpoint
ALTER DEFAULT PRIVILEGES IN SCHEMA public GRANT USAGE, SELECT ON SEQUENCES TO rillscale_app;
--> statement-breakpoint
REVOKE UPDATE, DELETE, TRUNCATE ON audit_events FROM rillscale_app;
--> statement-breakpoint
CREATE FUNCTION audit_events_refuse_change() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  RAISE EXCEPTION 'audit_events is append-only: % refused', TG_OP USING ERRCODE = 'insufficient_privilege';
END;
$$;
--> statement-breakpoint
CREATE TRIGGER audit_events_no_update_delete BEFORE UPDATE OR DELETE ON audit_events
  FOR EACH ROW EXECUTE FUNCTION audit_events_refuse_change();
--> statement-breakpoint
CREATE TRIGGER audit_events_no_truncate BEFORE TRUNCATE ON audit_events
  FOR EACH STATEMENT EXECUTE FUNCTION audit_events_refuse_change();

CREATE TYPE "public"."job_state" AS ENUM('queued', 'scheduled', 'running', 'succeeded', 'failed', 'cancelled');--> statement-breakpoint
CREATE TABLE "jobs" (
	"id" serial PRIMARY KEY NOT NULL,
	"name" text NOT NULL,
	"kind" text DEFAULT 'beamform' NOT NULL,
	"owner_id" integer NOT NULL,
	"params" jsonb NOT NULL,
	"params_version" integer NOT NULL,
	"recording_id" integer,
	"training_recording_id" integer,
	"array_id" integer,
	"array_snapshot" jsonb,
	"state" "job_state" DEFAULT 'queued' NOT NULL,
	"priority" integer DEFAULT 0 NOT NULL,
	"run_after" timestamp with time zone DEFAULT now() NOT NULL,
	"attempts" integer DEFAULT 0 NOT NULL,
	"max_attempts" integer DEFAULT 3 NOT NULL,
	"claimed_by" text,
	"lease_expires_at" timestamp with time zone,
	"cancel_requested" boolean DEFAULT false NOT NULL,
	"checkpoint_window" integer DEFAULT 0 NOT NULL,
	"total_windows" integer,
	"windows_done" integer DEFAULT 0 NOT NULL,
	"windows_per_second" double precision,
	"eta_seconds" double precision,
	"last_error" text,
	"partial" boolean DEFAULT false NOT NULL,
	"rerun_of" integer,
	"started_at" timestamp with time zone,
	"finished_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"claimable" boolean GENERATED ALWAYS AS (state in ('queued', 'scheduled')) STORED NOT NULL,
	CONSTRAINT "jobs_attempts_ck" CHECK ("jobs"."attempts" >= 0 and "jobs"."max_attempts" >= 1),
	CONSTRAINT "jobs_running_has_lease_ck" CHECK ("jobs"."state" <> 'running' or ("jobs"."claimed_by" is not null and "jobs"."lease_expires_at" is not null))
);
--> statement-breakpoint
CREATE TABLE "job_events" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"job_id" integer NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL,
	"from_state" "job_state",
	"to_state" "job_state" NOT NULL,
	"actor" text NOT NULL,
	"message" text,
	"data" jsonb
);
--> statement-breakpoint
CREATE TABLE "nodes" (
	"id" text PRIMARY KEY NOT NULL,
	"host" text NOT NULL,
	"pid" integer NOT NULL,
	"kind" text NOT NULL,
	"concurrency" integer NOT NULL,
	"started_at" timestamp with time zone DEFAULT now() NOT NULL,
	"heartbeat_at" timestamp with time zone DEFAULT now() NOT NULL,
	"draining" boolean DEFAULT false NOT NULL,
	"stopped_at" timestamp with time zone,
	"current_job_ids" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"windows_per_second" double precision DEFAULT 0 NOT NULL
);
--> statement-breakpoint
CREATE TABLE "audit" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL,
	"user_id" integer,
	"actor" text NOT NULL,
	"action" text NOT NULL,
	"target" text NOT NULL,
	"before" jsonb,
	"after" jsonb
);
--> statement-breakpoint
CREATE TABLE "queue_state" (
	"id" integer PRIMARY KEY DEFAULT 1 NOT NULL,
	"paused" boolean DEFAULT false NOT NULL,
	"paused_by" integer,
	"paused_at" timestamp with time zone,
	CONSTRAINT "queue_state_single_row_ck" CHECK ("queue_state"."id" = 1)
);
--> statement-breakpoint
ALTER TABLE "jobs" ADD CONSTRAINT "jobs_owner_id_users_id_fk" FOREIGN KEY ("owner_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "job_events" ADD CONSTRAINT "job_events_job_id_jobs_id_fk" FOREIGN KEY ("job_id") REFERENCES "public"."jobs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "jobs_claim_idx" ON "jobs" USING btree ("priority" DESC NULLS LAST,"created_at","id") WHERE "jobs"."claimable";--> statement-breakpoint
CREATE INDEX "jobs_lease_idx" ON "jobs" USING btree ("lease_expires_at") WHERE "jobs"."state" = 'running';--> statement-breakpoint
CREATE INDEX "jobs_owner_idx" ON "jobs" USING btree ("owner_id","created_at");--> statement-breakpoint
CREATE INDEX "jobs_state_idx" ON "jobs" USING btree ("state","created_at");--> statement-breakpoint
CREATE INDEX "job_events_job_idx" ON "job_events" USING btree ("job_id","id");--> statement-breakpoint
CREATE INDEX "nodes_heartbeat_idx" ON "nodes" USING btree ("heartbeat_at");--> statement-breakpoint
CREATE INDEX "audit_at_idx" ON "audit" USING btree ("at");--> statement-breakpoint
CREATE INDEX "audit_target_idx" ON "audit" USING btree ("target","at");
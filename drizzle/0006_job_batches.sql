CREATE TABLE "job_batches" (
	"id" serial PRIMARY KEY NOT NULL,
	"name" text NOT NULL,
	"owner_id" integer NOT NULL,
	"recording_count" integer NOT NULL,
	"archive_root_id" integer,
	"folder" text,
	"pattern" text,
	"recursive" boolean,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "jobs" ADD COLUMN "batch_id" integer;--> statement-breakpoint
ALTER TABLE "job_batches" ADD CONSTRAINT "job_batches_owner_id_users_id_fk" FOREIGN KEY ("owner_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "jobs_batch_idx" ON "jobs" USING btree ("batch_id") WHERE "jobs"."batch_id" is not null;
CREATE TABLE "archive_roots" (
	"id" serial PRIMARY KEY NOT NULL,
	"name" text NOT NULL,
	"path" text NOT NULL,
	"notes" text DEFAULT '' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "archive_roots_path_unique" UNIQUE("path")
);
--> statement-breakpoint
CREATE TABLE "arrays" (
	"id" serial PRIMARY KEY NOT NULL,
	"lineage_id" integer NOT NULL,
	"version" integer DEFAULT 1 NOT NULL,
	"current" boolean DEFAULT true NOT NULL,
	"name" text NOT NULL,
	"notes" text DEFAULT '' NOT NULL,
	"geometry" jsonb NOT NULL,
	"medium" jsonb NOT NULL,
	"design_frequency_hz" double precision,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "recordings" (
	"id" serial PRIMARY KEY NOT NULL,
	"name" text NOT NULL,
	"source" text NOT NULL,
	"file_path" text NOT NULL,
	"sidecar" text,
	"sidecar_path" text,
	"declared_format" text NOT NULL,
	"format" text,
	"size_bytes" bigint NOT NULL,
	"sha256" text,
	"expected_sha256" text,
	"channels" integer,
	"sample_rate" double precision,
	"sample_frames" bigint,
	"duration_s" double precision,
	"datatype" text,
	"state" text DEFAULT 'inspecting' NOT NULL,
	"inspect_progress" real DEFAULT 0 NOT NULL,
	"reject_reasons" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"qc" jsonb,
	"array_id" integer,
	"archive_root_id" integer,
	"uploaded_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "upload_chunks" (
	"upload_id" text NOT NULL,
	"index" integer NOT NULL,
	"size_bytes" integer NOT NULL,
	"sha256" text NOT NULL,
	"received_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "upload_chunks_upload_id_index_pk" PRIMARY KEY("upload_id","index")
);
--> statement-breakpoint
CREATE TABLE "uploads" (
	"id" text PRIMARY KEY NOT NULL,
	"user_id" integer NOT NULL,
	"name" text NOT NULL,
	"size_bytes" bigint NOT NULL,
	"declared_format" text NOT NULL,
	"sha256" text,
	"sidecar" text,
	"sidecar_name" text,
	"chunk_bytes" integer NOT NULL,
	"chunk_count" integer NOT NULL,
	"state" text DEFAULT 'receiving' NOT NULL,
	"part_path" text NOT NULL,
	"recording_id" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "arrays" ADD CONSTRAINT "arrays_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "recordings" ADD CONSTRAINT "recordings_array_id_arrays_id_fk" FOREIGN KEY ("array_id") REFERENCES "public"."arrays"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "recordings" ADD CONSTRAINT "recordings_archive_root_id_archive_roots_id_fk" FOREIGN KEY ("archive_root_id") REFERENCES "public"."archive_roots"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "recordings" ADD CONSTRAINT "recordings_uploaded_by_users_id_fk" FOREIGN KEY ("uploaded_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "upload_chunks" ADD CONSTRAINT "upload_chunks_upload_id_uploads_id_fk" FOREIGN KEY ("upload_id") REFERENCES "public"."uploads"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "uploads" ADD CONSTRAINT "uploads_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "uploads" ADD CONSTRAINT "uploads_recording_id_recordings_id_fk" FOREIGN KEY ("recording_id") REFERENCES "public"."recordings"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "arrays_lineage_idx" ON "arrays" USING btree ("lineage_id","version");--> statement-breakpoint
CREATE INDEX "recordings_created_idx" ON "recordings" USING btree ("created_at");--> statement-breakpoint
CREATE INDEX "recordings_state_idx" ON "recordings" USING btree ("state");--> statement-breakpoint
CREATE INDEX "uploads_user_state_idx" ON "uploads" USING btree ("user_id","state");
CREATE TABLE "live_changes" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"topic" text NOT NULL,
	"ref" text NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE INDEX "live_changes_at_idx" ON "live_changes" USING btree ("at");
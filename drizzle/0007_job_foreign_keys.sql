-- Jobs whose recording, training recording, array or batch row was removed before these keys
-- existed keep their results and frozen array snapshot; only the dangling id is cleared.
UPDATE "jobs" SET "recording_id" = NULL WHERE "recording_id" IS NOT NULL AND NOT EXISTS (SELECT 1 FROM "recordings" r WHERE r."id" = "jobs"."recording_id");--> statement-breakpoint
UPDATE "jobs" SET "training_recording_id" = NULL WHERE "training_recording_id" IS NOT NULL AND NOT EXISTS (SELECT 1 FROM "recordings" r WHERE r."id" = "jobs"."training_recording_id");--> statement-breakpoint
UPDATE "jobs" SET "array_id" = NULL WHERE "array_id" IS NOT NULL AND NOT EXISTS (SELECT 1 FROM "arrays" a WHERE a."id" = "jobs"."array_id");--> statement-breakpoint
UPDATE "jobs" SET "batch_id" = NULL WHERE "batch_id" IS NOT NULL AND NOT EXISTS (SELECT 1 FROM "job_batches" b WHERE b."id" = "jobs"."batch_id");--> statement-breakpoint
ALTER TABLE "jobs" ADD CONSTRAINT "jobs_recording_id_recordings_id_fk" FOREIGN KEY ("recording_id") REFERENCES "public"."recordings"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "jobs" ADD CONSTRAINT "jobs_training_recording_id_recordings_id_fk" FOREIGN KEY ("training_recording_id") REFERENCES "public"."recordings"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "jobs" ADD CONSTRAINT "jobs_array_id_arrays_id_fk" FOREIGN KEY ("array_id") REFERENCES "public"."arrays"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "jobs" ADD CONSTRAINT "jobs_batch_id_job_batches_id_fk" FOREIGN KEY ("batch_id") REFERENCES "public"."job_batches"("id") ON DELETE restrict ON UPDATE no action;
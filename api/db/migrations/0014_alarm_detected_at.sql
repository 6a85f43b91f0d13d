ALTER TABLE "alarms" ADD COLUMN "detected_at" timestamp with time zone DEFAULT now() NOT NULL;--> statement-breakpoint
UPDATE "alarms" SET "detected_at" = "created_at";--> statement-breakpoint
CREATE INDEX "alarms_detected_idx" ON "alarms" USING btree ("detected_at");--> statement-breakpoint
CREATE INDEX "alarms_run_idx" ON "alarms" USING btree ("run_id");
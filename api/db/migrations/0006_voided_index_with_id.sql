DROP INDEX "measurements_voided_idx";--> statement-breakpoint
CREATE INDEX "measurements_voided_idx" ON "measurements" USING btree ("characteristic_id","id") WHERE voided_at is not null;
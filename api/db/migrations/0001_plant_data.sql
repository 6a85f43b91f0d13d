CREATE TYPE "public"."chart_type" AS ENUM('xbar-r', 'xbar-s', 'imr');--> statement-breakpoint
CREATE TYPE "public"."measurement_source" AS ENUM('upload', 'manual');--> statement-breakpoint
CREATE TYPE "public"."rule_set" AS ENUM('we', 'extended');--> statement-breakpoint
CREATE TYPE "public"."upload_status" AS ENUM('imported', 'rejected', 'voided');--> statement-breakpoint
CREATE TABLE "characteristics" (
	"id" serial PRIMARY KEY NOT NULL,
	"code" text NOT NULL,
	"product_id" integer NOT NULL,
	"test_method_id" integer NOT NULL,
	"age_days" integer,
	"name" text NOT NULL,
	"unit" text NOT NULL,
	"subgroup_size" integer NOT NULL,
	"chart_type" chart_type NOT NULL,
	"rule_set" "rule_set" DEFAULT 'we' NOT NULL,
	"sampling_plan" text,
	"active" boolean DEFAULT true NOT NULL,
	CONSTRAINT "characteristics_code_unique" UNIQUE("code")
);
--> statement-breakpoint
CREATE TABLE "column_mappings" (
	"id" serial PRIMARY KEY NOT NULL,
	"name" text NOT NULL,
	"mapping" jsonb NOT NULL,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "column_mappings_name_unique" UNIQUE("name")
);
--> statement-breakpoint
CREATE TABLE "lots" (
	"id" serial PRIMARY KEY NOT NULL,
	"lot_number" text NOT NULL,
	"product_id" integer NOT NULL,
	"line_id" integer NOT NULL,
	"produced_at" timestamp with time zone NOT NULL,
	"shift" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "lots_lot_number_unique" UNIQUE("lot_number")
);
--> statement-breakpoint
CREATE TABLE "measurements" (
	"id" serial PRIMARY KEY NOT NULL,
	"lot_id" integer NOT NULL,
	"characteristic_id" integer NOT NULL,
	"replicate" integer NOT NULL,
	"value" double precision NOT NULL,
	"tested_at" timestamp with time zone,
	"operator" text,
	"note" text,
	"source" "measurement_source" NOT NULL,
	"upload_id" integer,
	"entered_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"voided_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "plants" (
	"id" serial PRIMARY KEY NOT NULL,
	"code" text NOT NULL,
	"name" text NOT NULL,
	"time_zone" text NOT NULL,
	"nightly_run_cron" text DEFAULT '0 2 * * *' NOT NULL,
	CONSTRAINT "plants_code_unique" UNIQUE("code")
);
--> statement-breakpoint
CREATE TABLE "process_events" (
	"id" serial PRIMARY KEY NOT NULL,
	"plant_id" integer NOT NULL,
	"line_id" integer,
	"product_id" integer,
	"occurred_at" timestamp with time zone NOT NULL,
	"title" text NOT NULL,
	"description" text,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "production_lines" (
	"id" serial PRIMARY KEY NOT NULL,
	"plant_id" integer NOT NULL,
	"code" text NOT NULL,
	"name" text NOT NULL
);
--> statement-breakpoint
CREATE TABLE "products" (
	"id" serial PRIMARY KEY NOT NULL,
	"plant_id" integer NOT NULL,
	"code" text NOT NULL,
	"name" text NOT NULL,
	"family" text NOT NULL,
	"declared_class" text,
	"line_id" integer,
	"active" boolean DEFAULT true NOT NULL,
	CONSTRAINT "products_code_unique" UNIQUE("code")
);
--> statement-breakpoint
CREATE TABLE "spec_limits" (
	"id" serial PRIMARY KEY NOT NULL,
	"characteristic_id" integer NOT NULL,
	"revision" integer NOT NULL,
	"lsl" double precision,
	"usl" double precision,
	"target" double precision,
	"effective_from" timestamp with time zone NOT NULL,
	"reason" text,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "test_methods" (
	"id" serial PRIMARY KEY NOT NULL,
	"code" text NOT NULL,
	"name" text NOT NULL,
	"standard" text NOT NULL,
	"unit" text NOT NULL,
	"state" text NOT NULL,
	"physical_min" double precision NOT NULL,
	"physical_max" double precision NOT NULL,
	"physical_max_exclusive" boolean DEFAULT false NOT NULL,
	"decimals" integer NOT NULL,
	"raw_load" text,
	CONSTRAINT "test_methods_code_unique" UNIQUE("code")
);
--> statement-breakpoint
CREATE TABLE "uploads" (
	"id" serial PRIMARY KEY NOT NULL,
	"file_name" text NOT NULL,
	"sha256" text NOT NULL,
	"uploaded_by" integer,
	"uploaded_at" timestamp with time zone DEFAULT now() NOT NULL,
	"status" "upload_status" NOT NULL,
	"format" text DEFAULT 'long' NOT NULL,
	"rows_total" integer NOT NULL,
	"rows_imported" integer DEFAULT 0 NOT NULL,
	"rows_rejected" integer DEFAULT 0 NOT NULL,
	"errors" jsonb,
	"content" "bytea" NOT NULL,
	"voided_at" timestamp with time zone,
	"voided_by" integer,
	"void_reason" text
);
--> statement-breakpoint
ALTER TABLE "characteristics" ADD CONSTRAINT "characteristics_product_id_products_id_fk" FOREIGN KEY ("product_id") REFERENCES "public"."products"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "characteristics" ADD CONSTRAINT "characteristics_test_method_id_test_methods_id_fk" FOREIGN KEY ("test_method_id") REFERENCES "public"."test_methods"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "column_mappings" ADD CONSTRAINT "column_mappings_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lots" ADD CONSTRAINT "lots_product_id_products_id_fk" FOREIGN KEY ("product_id") REFERENCES "public"."products"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lots" ADD CONSTRAINT "lots_line_id_production_lines_id_fk" FOREIGN KEY ("line_id") REFERENCES "public"."production_lines"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "measurements" ADD CONSTRAINT "measurements_lot_id_lots_id_fk" FOREIGN KEY ("lot_id") REFERENCES "public"."lots"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "measurements" ADD CONSTRAINT "measurements_characteristic_id_characteristics_id_fk" FOREIGN KEY ("characteristic_id") REFERENCES "public"."characteristics"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "measurements" ADD CONSTRAINT "measurements_upload_id_uploads_id_fk" FOREIGN KEY ("upload_id") REFERENCES "public"."uploads"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "measurements" ADD CONSTRAINT "measurements_entered_by_users_id_fk" FOREIGN KEY ("entered_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "process_events" ADD CONSTRAINT "process_events_plant_id_plants_id_fk" FOREIGN KEY ("plant_id") REFERENCES "public"."plants"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "process_events" ADD CONSTRAINT "process_events_line_id_production_lines_id_fk" FOREIGN KEY ("line_id") REFERENCES "public"."production_lines"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "process_events" ADD CONSTRAINT "process_events_product_id_products_id_fk" FOREIGN KEY ("product_id") REFERENCES "public"."products"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "process_events" ADD CONSTRAINT "process_events_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "production_lines" ADD CONSTRAINT "production_lines_plant_id_plants_id_fk" FOREIGN KEY ("plant_id") REFERENCES "public"."plants"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "products" ADD CONSTRAINT "products_plant_id_plants_id_fk" FOREIGN KEY ("plant_id") REFERENCES "public"."plants"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "products" ADD CONSTRAINT "products_line_id_production_lines_id_fk" FOREIGN KEY ("line_id") REFERENCES "public"."production_lines"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spec_limits" ADD CONSTRAINT "spec_limits_characteristic_id_characteristics_id_fk" FOREIGN KEY ("characteristic_id") REFERENCES "public"."characteristics"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spec_limits" ADD CONSTRAINT "spec_limits_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "uploads" ADD CONSTRAINT "uploads_uploaded_by_users_id_fk" FOREIGN KEY ("uploaded_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "uploads" ADD CONSTRAINT "uploads_voided_by_users_id_fk" FOREIGN KEY ("voided_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "lots_product_produced_idx" ON "lots" USING btree ("product_id","produced_at");--> statement-breakpoint
CREATE UNIQUE INDEX "measurements_live_key" ON "measurements" USING btree ("lot_id","characteristic_id","replicate") WHERE voided_at is null;--> statement-breakpoint
CREATE INDEX "measurements_characteristic_idx" ON "measurements" USING btree ("characteristic_id");--> statement-breakpoint
CREATE INDEX "measurements_upload_idx" ON "measurements" USING btree ("upload_id");--> statement-breakpoint
CREATE INDEX "process_events_occurred_idx" ON "process_events" USING btree ("occurred_at");--> statement-breakpoint
CREATE UNIQUE INDEX "production_lines_plant_code_key" ON "production_lines" USING btree ("plant_id","code");--> statement-breakpoint
CREATE UNIQUE INDEX "spec_limits_revision_key" ON "spec_limits" USING btree ("characteristic_id","revision");--> statement-breakpoint
CREATE UNIQUE INDEX "uploads_sha256_kept_key" ON "uploads" USING btree ("sha256") WHERE status <> 'rejected';
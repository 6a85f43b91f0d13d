CREATE TYPE "public"."alarm_status" AS ENUM('open', 'acknowledged', 'closed');--> statement-breakpoint
CREATE TYPE "public"."mail_status" AS ENUM('pending', 'sent');--> statement-breakpoint
CREATE TYPE "public"."spc_run_kind" AS ENUM('full', 'incremental');--> statement-breakpoint
CREATE TYPE "public"."spc_run_status" AS ENUM('queued', 'running', 'succeeded', 'failed');--> statement-breakpoint
CREATE TABLE "alarm_subscriptions" (
	"id" serial PRIMARY KEY NOT NULL,
	"user_id" integer NOT NULL,
	"line_id" integer,
	"product_id" integer,
	"immediate" boolean NOT NULL,
	"digest" boolean NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "alarm_subscriptions_one_scope" CHECK ((line_id is null) <> (product_id is null))
);
--> statement-breakpoint
CREATE TABLE "alarms" (
	"id" serial PRIMARY KEY NOT NULL,
	"characteristic_id" integer NOT NULL,
	"lot_id" integer NOT NULL,
	"rule" text NOT NULL,
	"chart" text NOT NULL,
	"point_index" integer NOT NULL,
	"statistic" double precision NOT NULL,
	"values" double precision[] NOT NULL,
	"limit_name" text,
	"limit_value" double precision,
	"description" text NOT NULL,
	"late" boolean DEFAULT false NOT NULL,
	"late_reason" text,
	"source" text NOT NULL,
	"run_id" integer,
	"status" "alarm_status" DEFAULT 'open' NOT NULL,
	"resolution" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"acknowledged_at" timestamp with time zone,
	"acknowledged_by" integer,
	"acknowledge_note" text,
	"closed_at" timestamp with time zone,
	"closed_by" integer,
	"close_note" text
);
--> statement-breakpoint
CREATE TABLE "control_limit_revisions" (
	"id" serial PRIMARY KEY NOT NULL,
	"characteristic_id" integer NOT NULL,
	"revision" integer NOT NULL,
	"chart_type" chart_type NOT NULL,
	"subgroup_size" integer NOT NULL,
	"center" double precision NOT NULL,
	"sigma_within" double precision NOT NULL,
	"location_ucl" double precision NOT NULL,
	"location_lcl" double precision NOT NULL,
	"dispersion_center" double precision,
	"dispersion_ucl" double precision,
	"dispersion_lcl" double precision,
	"baseline_from" timestamp with time zone NOT NULL,
	"baseline_to" timestamp with time zone NOT NULL,
	"baseline_points" integer NOT NULL,
	"reason" text NOT NULL,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"superseded_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "mail_outbox" (
	"id" serial PRIMARY KEY NOT NULL,
	"dedupe_key" text NOT NULL,
	"kind" text NOT NULL,
	"user_id" integer,
	"to_address" text NOT NULL,
	"subject" text NOT NULL,
	"text_body" text NOT NULL,
	"html_body" text NOT NULL,
	"alarm_ids" integer[] NOT NULL,
	"status" "mail_status" DEFAULT 'pending' NOT NULL,
	"attempts" integer DEFAULT 0 NOT NULL,
	"next_attempt_at" timestamp with time zone DEFAULT now() NOT NULL,
	"locked_until" timestamp with time zone,
	"last_error" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"sent_at" timestamp with time zone,
	CONSTRAINT "mail_outbox_dedupe_key_unique" UNIQUE("dedupe_key")
);
--> statement-breakpoint
CREATE TABLE "point_exclusions" (
	"id" serial PRIMARY KEY NOT NULL,
	"characteristic_id" integer NOT NULL,
	"lot_id" integer NOT NULL,
	"reason" text NOT NULL,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"removed_at" timestamp with time zone,
	"removed_by" integer,
	"removal_reason" text
);
--> statement-breakpoint
CREATE TABLE "spc_run_items" (
	"id" serial PRIMARY KEY NOT NULL,
	"run_id" integer NOT NULL,
	"characteristic_id" integer NOT NULL,
	"status" "spc_run_status" DEFAULT 'queued' NOT NULL,
	"job_id" text,
	"worker" text,
	"attempts" integer DEFAULT 0 NOT NULL,
	"error" text,
	"changed" boolean,
	"alarms_raised" integer DEFAULT 0 NOT NULL,
	"alarms_resolved" integer DEFAULT 0 NOT NULL,
	"started_at" timestamp with time zone,
	"finished_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "spc_runs" (
	"id" serial PRIMARY KEY NOT NULL,
	"kind" "spc_run_kind" NOT NULL,
	"trigger" text NOT NULL,
	"plant_id" integer,
	"schedule_key" text,
	"requested_by" integer,
	"status" "spc_run_status" DEFAULT 'queued' NOT NULL,
	"characteristics" integer NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"started_at" timestamp with time zone,
	"finished_at" timestamp with time zone,
	CONSTRAINT "spc_runs_schedule_key_unique" UNIQUE("schedule_key")
);
--> statement-breakpoint
CREATE TABLE "spc_snapshots" (
	"characteristic_id" integer PRIMARY KEY NOT NULL,
	"run_id" integer,
	"computed_at" timestamp with time zone NOT NULL,
	"fingerprint" text NOT NULL,
	"phase" text NOT NULL,
	"point_count" integer NOT NULL,
	"period_from" timestamp with time zone,
	"period_to" timestamp with time zone,
	"lot_ids" integer[] NOT NULL,
	"location" double precision[] NOT NULL,
	"dispersion" double precision[] NOT NULL,
	"excluded_lot_ids" integer[] NOT NULL,
	"out_of_spec_lot_ids" integer[] NOT NULL,
	"limits" jsonb NOT NULL,
	"violations" jsonb NOT NULL,
	"capability" jsonb,
	"reasons" jsonb NOT NULL
);
--> statement-breakpoint
ALTER TABLE "alarm_subscriptions" ADD CONSTRAINT "alarm_subscriptions_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alarm_subscriptions" ADD CONSTRAINT "alarm_subscriptions_line_id_production_lines_id_fk" FOREIGN KEY ("line_id") REFERENCES "public"."production_lines"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alarm_subscriptions" ADD CONSTRAINT "alarm_subscriptions_product_id_products_id_fk" FOREIGN KEY ("product_id") REFERENCES "public"."products"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alarms" ADD CONSTRAINT "alarms_characteristic_id_characteristics_id_fk" FOREIGN KEY ("characteristic_id") REFERENCES "public"."characteristics"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alarms" ADD CONSTRAINT "alarms_lot_id_lots_id_fk" FOREIGN KEY ("lot_id") REFERENCES "public"."lots"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alarms" ADD CONSTRAINT "alarms_run_id_spc_runs_id_fk" FOREIGN KEY ("run_id") REFERENCES "public"."spc_runs"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alarms" ADD CONSTRAINT "alarms_acknowledged_by_users_id_fk" FOREIGN KEY ("acknowledged_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alarms" ADD CONSTRAINT "alarms_closed_by_users_id_fk" FOREIGN KEY ("closed_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "control_limit_revisions" ADD CONSTRAINT "control_limit_revisions_characteristic_id_characteristics_id_fk" FOREIGN KEY ("characteristic_id") REFERENCES "public"."characteristics"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "control_limit_revisions" ADD CONSTRAINT "control_limit_revisions_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "mail_outbox" ADD CONSTRAINT "mail_outbox_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "point_exclusions" ADD CONSTRAINT "point_exclusions_characteristic_id_characteristics_id_fk" FOREIGN KEY ("characteristic_id") REFERENCES "public"."characteristics"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "point_exclusions" ADD CONSTRAINT "point_exclusions_lot_id_lots_id_fk" FOREIGN KEY ("lot_id") REFERENCES "public"."lots"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "point_exclusions" ADD CONSTRAINT "point_exclusions_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "point_exclusions" ADD CONSTRAINT "point_exclusions_removed_by_users_id_fk" FOREIGN KEY ("removed_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spc_run_items" ADD CONSTRAINT "spc_run_items_run_id_spc_runs_id_fk" FOREIGN KEY ("run_id") REFERENCES "public"."spc_runs"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spc_run_items" ADD CONSTRAINT "spc_run_items_characteristic_id_characteristics_id_fk" FOREIGN KEY ("characteristic_id") REFERENCES "public"."characteristics"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spc_runs" ADD CONSTRAINT "spc_runs_plant_id_plants_id_fk" FOREIGN KEY ("plant_id") REFERENCES "public"."plants"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spc_runs" ADD CONSTRAINT "spc_runs_requested_by_users_id_fk" FOREIGN KEY ("requested_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spc_snapshots" ADD CONSTRAINT "spc_snapshots_characteristic_id_characteristics_id_fk" FOREIGN KEY ("characteristic_id") REFERENCES "public"."characteristics"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spc_snapshots" ADD CONSTRAINT "spc_snapshots_run_id_spc_runs_id_fk" FOREIGN KEY ("run_id") REFERENCES "public"."spc_runs"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "alarm_subscriptions_line_key" ON "alarm_subscriptions" USING btree ("user_id","line_id") WHERE line_id is not null;--> statement-breakpoint
CREATE UNIQUE INDEX "alarm_subscriptions_product_key" ON "alarm_subscriptions" USING btree ("user_id","product_id") WHERE product_id is not null;--> statement-breakpoint
CREATE UNIQUE INDEX "alarms_dedupe_key" ON "alarms" USING btree ("characteristic_id","rule","chart","lot_id");--> statement-breakpoint
CREATE INDEX "alarms_status_created_idx" ON "alarms" USING btree ("status","created_at");--> statement-breakpoint
CREATE UNIQUE INDEX "control_limit_revisions_revision_key" ON "control_limit_revisions" USING btree ("characteristic_id","revision");--> statement-breakpoint
CREATE UNIQUE INDEX "control_limit_revisions_in_force_key" ON "control_limit_revisions" USING btree ("characteristic_id") WHERE superseded_at is null;--> statement-breakpoint
CREATE INDEX "mail_outbox_pending_idx" ON "mail_outbox" USING btree ("next_attempt_at") WHERE status = 'pending';--> statement-breakpoint
CREATE UNIQUE INDEX "point_exclusions_active_key" ON "point_exclusions" USING btree ("characteristic_id","lot_id") WHERE removed_at is null;--> statement-breakpoint
CREATE UNIQUE INDEX "spc_run_items_run_characteristic_key" ON "spc_run_items" USING btree ("run_id","characteristic_id");--> statement-breakpoint
CREATE INDEX "spc_run_items_job_idx" ON "spc_run_items" USING btree ("job_id");--> statement-breakpoint
CREATE INDEX "spc_runs_created_idx" ON "spc_runs" USING btree ("created_at");
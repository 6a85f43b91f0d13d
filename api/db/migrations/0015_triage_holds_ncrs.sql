CREATE TYPE "public"."hold_source" AS ENUM('out-of-spec', 'manual', 'ncr');--> statement-breakpoint
CREATE TYPE "public"."lot_disposition" AS ENUM('release', 'rework', 'downgrade', 'scrap');--> statement-breakpoint
CREATE TYPE "public"."ncr_action_kind" AS ENUM('corrective', 'preventive');--> statement-breakpoint
CREATE TYPE "public"."ncr_severity" AS ENUM('minor', 'major', 'critical');--> statement-breakpoint
CREATE TYPE "public"."ncr_status" AS ENUM('open', 'investigating', 'actions-pending', 'closed');--> statement-breakpoint
ALTER TYPE "public"."alarm_status" ADD VALUE 'investigating' BEFORE 'closed';--> statement-breakpoint
CREATE TABLE "alarm_comments" (
	"id" serial PRIMARY KEY NOT NULL,
	"alarm_id" integer NOT NULL,
	"author_id" integer NOT NULL,
	"body" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "alarm_groups" (
	"id" serial PRIMARY KEY NOT NULL,
	"title" text NOT NULL,
	"note" text,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "capability_watch" (
	"characteristic_id" integer PRIMARY KEY NOT NULL,
	"below" boolean NOT NULL,
	"index_name" text NOT NULL,
	"index_value" double precision,
	"threshold" double precision NOT NULL,
	"changed_at" timestamp with time zone DEFAULT now() NOT NULL,
	"alarm_id" integer
);
--> statement-breakpoint
CREATE TABLE "lot_holds" (
	"id" serial PRIMARY KEY NOT NULL,
	"lot_id" integer NOT NULL,
	"source" "hold_source" NOT NULL,
	"reason" text NOT NULL,
	"alarm_id" integer,
	"ncr_id" integer,
	"placed_by" integer,
	"placed_at" timestamp with time zone DEFAULT now() NOT NULL,
	"released_at" timestamp with time zone,
	"released_by" integer,
	"release_reason" text
);
--> statement-breakpoint
CREATE TABLE "ncr_actions" (
	"id" serial PRIMARY KEY NOT NULL,
	"ncr_id" integer NOT NULL,
	"kind" "ncr_action_kind" NOT NULL,
	"description" text NOT NULL,
	"owner_id" integer NOT NULL,
	"due_date" date NOT NULL,
	"done_date" date,
	"evidence" text,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "ncr_alarms" (
	"ncr_id" integer NOT NULL,
	"alarm_id" integer NOT NULL,
	CONSTRAINT "ncr_alarms_ncr_id_alarm_id_pk" PRIMARY KEY("ncr_id","alarm_id")
);
--> statement-breakpoint
CREATE TABLE "ncr_attachments" (
	"id" serial PRIMARY KEY NOT NULL,
	"ncr_id" integer NOT NULL,
	"file_id" integer NOT NULL,
	"note" text,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "ncr_counters" (
	"plant_id" integer NOT NULL,
	"year" integer NOT NULL,
	"last_number" integer NOT NULL,
	CONSTRAINT "ncr_counters_plant_id_year_pk" PRIMARY KEY("plant_id","year")
);
--> statement-breakpoint
CREATE TABLE "ncr_lots" (
	"ncr_id" integer NOT NULL,
	"lot_id" integer NOT NULL,
	"quantity_t" double precision,
	"disposition" "lot_disposition",
	"downgrade_product_id" integer,
	"disposition_note" text,
	"disposed_at" timestamp with time zone,
	"disposed_by" integer,
	CONSTRAINT "ncr_lots_ncr_id_lot_id_pk" PRIMARY KEY("ncr_id","lot_id")
);
--> statement-breakpoint
CREATE TABLE "ncrs" (
	"id" serial PRIMARY KEY NOT NULL,
	"plant_id" integer NOT NULL,
	"number" text NOT NULL,
	"year" integer NOT NULL,
	"sequence" integer NOT NULL,
	"title" text NOT NULL,
	"description" text NOT NULL,
	"product_id" integer,
	"severity" "ncr_severity" NOT NULL,
	"status" "ncr_status" DEFAULT 'open' NOT NULL,
	"raised_from" text NOT NULL,
	"assignee_id" integer,
	"root_cause_category" text,
	"root_cause_analysis" text,
	"approved_at" timestamp with time zone,
	"approved_by" integer,
	"approval_note" text,
	"effectiveness_check" text,
	"effective" boolean,
	"closed_at" timestamp with time zone,
	"closed_by" integer,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "ncrs_number_unique" UNIQUE("number")
);
--> statement-breakpoint
ALTER TABLE "characteristics" ADD COLUMN "capability_threshold" double precision;--> statement-breakpoint
ALTER TABLE "plants" ADD COLUMN "capability_threshold" double precision DEFAULT 1.33 NOT NULL;--> statement-breakpoint
ALTER TABLE "alarms" ADD COLUMN "outcome" text;--> statement-breakpoint
ALTER TABLE "alarms" ADD COLUMN "cause_category" text;--> statement-breakpoint
ALTER TABLE "alarms" ADD COLUMN "assignee_id" integer;--> statement-breakpoint
ALTER TABLE "alarms" ADD COLUMN "group_id" integer;--> statement-breakpoint
ALTER TABLE "alarms" ADD COLUMN "investigating_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "alarms" ADD COLUMN "investigating_by" integer;--> statement-breakpoint
ALTER TABLE "alarms" ADD COLUMN "reopened_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "alarms" ADD COLUMN "reopened_by" integer;--> statement-breakpoint
ALTER TABLE "alarms" ADD COLUMN "reopen_reason" text;--> statement-breakpoint
ALTER TABLE "alarm_comments" ADD CONSTRAINT "alarm_comments_alarm_id_alarms_id_fk" FOREIGN KEY ("alarm_id") REFERENCES "public"."alarms"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alarm_comments" ADD CONSTRAINT "alarm_comments_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alarm_groups" ADD CONSTRAINT "alarm_groups_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "capability_watch" ADD CONSTRAINT "capability_watch_characteristic_id_characteristics_id_fk" FOREIGN KEY ("characteristic_id") REFERENCES "public"."characteristics"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "capability_watch" ADD CONSTRAINT "capability_watch_alarm_id_alarms_id_fk" FOREIGN KEY ("alarm_id") REFERENCES "public"."alarms"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lot_holds" ADD CONSTRAINT "lot_holds_lot_id_lots_id_fk" FOREIGN KEY ("lot_id") REFERENCES "public"."lots"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lot_holds" ADD CONSTRAINT "lot_holds_alarm_id_alarms_id_fk" FOREIGN KEY ("alarm_id") REFERENCES "public"."alarms"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lot_holds" ADD CONSTRAINT "lot_holds_ncr_id_ncrs_id_fk" FOREIGN KEY ("ncr_id") REFERENCES "public"."ncrs"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lot_holds" ADD CONSTRAINT "lot_holds_placed_by_users_id_fk" FOREIGN KEY ("placed_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lot_holds" ADD CONSTRAINT "lot_holds_released_by_users_id_fk" FOREIGN KEY ("released_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ncr_actions" ADD CONSTRAINT "ncr_actions_ncr_id_ncrs_id_fk" FOREIGN KEY ("ncr_id") REFERENCES "public"."ncrs"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ncr_actions" ADD CONSTRAINT "ncr_actions_owner_id_users_id_fk" FOREIGN KEY ("owner_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ncr_actions" ADD CONSTRAINT "ncr_actions_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ncr_alarms" ADD CONSTRAINT "ncr_alarms_ncr_id_ncrs_id_fk" FOREIGN KEY ("ncr_id") REFERENCES "public"."ncrs"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ncr_alarms" ADD CONSTRAINT "ncr_alarms_alarm_id_alarms_id_fk" FOREIGN KEY ("alarm_id") REFERENCES "public"."alarms"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ncr_attachments" ADD CONSTRAINT "ncr_attachments_ncr_id_ncrs_id_fk" FOREIGN KEY ("ncr_id") REFERENCES "public"."ncrs"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ncr_attachments" ADD CONSTRAINT "ncr_attachments_file_id_stored_files_id_fk" FOREIGN KEY ("file_id") REFERENCES "public"."stored_files"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ncr_attachments" ADD CONSTRAINT "ncr_attachments_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ncr_counters" ADD CONSTRAINT "ncr_counters_plant_id_plants_id_fk" FOREIGN KEY ("plant_id") REFERENCES "public"."plants"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ncr_lots" ADD CONSTRAINT "ncr_lots_ncr_id_ncrs_id_fk" FOREIGN KEY ("ncr_id") REFERENCES "public"."ncrs"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ncr_lots" ADD CONSTRAINT "ncr_lots_lot_id_lots_id_fk" FOREIGN KEY ("lot_id") REFERENCES "public"."lots"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ncr_lots" ADD CONSTRAINT "ncr_lots_downgrade_product_id_products_id_fk" FOREIGN KEY ("downgrade_product_id") REFERENCES "public"."products"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ncr_lots" ADD CONSTRAINT "ncr_lots_disposed_by_users_id_fk" FOREIGN KEY ("disposed_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ncrs" ADD CONSTRAINT "ncrs_plant_id_plants_id_fk" FOREIGN KEY ("plant_id") REFERENCES "public"."plants"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ncrs" ADD CONSTRAINT "ncrs_product_id_products_id_fk" FOREIGN KEY ("product_id") REFERENCES "public"."products"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ncrs" ADD CONSTRAINT "ncrs_assignee_id_users_id_fk" FOREIGN KEY ("assignee_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ncrs" ADD CONSTRAINT "ncrs_approved_by_users_id_fk" FOREIGN KEY ("approved_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ncrs" ADD CONSTRAINT "ncrs_closed_by_users_id_fk" FOREIGN KEY ("closed_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ncrs" ADD CONSTRAINT "ncrs_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "alarm_comments_alarm_idx" ON "alarm_comments" USING btree ("alarm_id","created_at");--> statement-breakpoint
CREATE UNIQUE INDEX "lot_holds_open_key" ON "lot_holds" USING btree ("lot_id") WHERE released_at is null;--> statement-breakpoint
CREATE INDEX "lot_holds_lot_idx" ON "lot_holds" USING btree ("lot_id");--> statement-breakpoint
CREATE INDEX "ncr_actions_ncr_idx" ON "ncr_actions" USING btree ("ncr_id");--> statement-breakpoint
CREATE INDEX "ncr_actions_open_due_idx" ON "ncr_actions" USING btree ("due_date") WHERE done_date is null;--> statement-breakpoint
CREATE INDEX "ncr_alarms_alarm_idx" ON "ncr_alarms" USING btree ("alarm_id");--> statement-breakpoint
CREATE INDEX "ncr_attachments_ncr_idx" ON "ncr_attachments" USING btree ("ncr_id");--> statement-breakpoint
CREATE INDEX "ncr_lots_lot_idx" ON "ncr_lots" USING btree ("lot_id");--> statement-breakpoint
CREATE UNIQUE INDEX "ncrs_plant_year_sequence_key" ON "ncrs" USING btree ("plant_id","year","sequence");--> statement-breakpoint
CREATE INDEX "ncrs_status_idx" ON "ncrs" USING btree ("status");--> statement-breakpoint
ALTER TABLE "alarms" ADD CONSTRAINT "alarms_assignee_id_users_id_fk" FOREIGN KEY ("assignee_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alarms" ADD CONSTRAINT "alarms_group_id_alarm_groups_id_fk" FOREIGN KEY ("group_id") REFERENCES "public"."alarm_groups"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alarms" ADD CONSTRAINT "alarms_investigating_by_users_id_fk" FOREIGN KEY ("investigating_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alarms" ADD CONSTRAINT "alarms_reopened_by_users_id_fk" FOREIGN KEY ("reopened_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "alarms_assignee_idx" ON "alarms" USING btree ("assignee_id");--> statement-breakpoint
CREATE INDEX "alarms_group_idx" ON "alarms" USING btree ("group_id");
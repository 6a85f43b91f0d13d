ALTER TABLE "mail_outbox" ADD COLUMN "refs" jsonb DEFAULT '{}'::jsonb NOT NULL;--> statement-breakpoint
-- Written by hand: the alarms each message was about move into its references before the column goes.
UPDATE "mail_outbox" SET "refs" = jsonb_build_object('alarmIds', to_jsonb("alarm_ids"));--> statement-breakpoint
ALTER TABLE "mail_outbox" DROP COLUMN "alarm_ids";

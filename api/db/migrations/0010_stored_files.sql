-- Stored files: any record's file kept as it arrived (uploads now, nonconformance attachments later), a
-- megabyte a part. The upload files kept in upload_file_parts move here byte for byte, each under the id
-- of its upload, with the type read from its bytes as api/files/content-type.ts reads it; the old table
-- goes in the next migration.
CREATE TABLE "stored_file_parts" (
	"file_id" integer NOT NULL,
	"part" integer NOT NULL,
	"bytes" "bytea" NOT NULL,
	CONSTRAINT "stored_file_parts_file_id_part_pk" PRIMARY KEY("file_id","part")
);
--> statement-breakpoint
CREATE TABLE "stored_files" (
	"id" serial PRIMARY KEY NOT NULL,
	"sha256" text NOT NULL,
	"size_bytes" integer NOT NULL,
	"content_type" text NOT NULL,
	"file_name" text NOT NULL,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "uploads" ADD COLUMN "file_id" integer;--> statement-breakpoint
ALTER TABLE "stored_file_parts" ADD CONSTRAINT "stored_file_parts_file_id_stored_files_id_fk" FOREIGN KEY ("file_id") REFERENCES "public"."stored_files"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "stored_files" ADD CONSTRAINT "stored_files_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "uploads" ADD CONSTRAINT "uploads_file_id_stored_files_id_fk" FOREIGN KEY ("file_id") REFERENCES "public"."stored_files"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
-- LZ4 as for the upload parts before (migrations 0007, 0008); a server built without it keeps the parts as they are.
DO $$
BEGIN
  ALTER TABLE "stored_file_parts" ALTER COLUMN "bytes" SET COMPRESSION lz4;
EXCEPTION WHEN feature_not_supported THEN
  NULL;
END $$;--> statement-breakpoint
INSERT INTO "stored_files" ("id", "sha256", "size_bytes", "content_type", "file_name", "created_by", "created_at")
  SELECT u."id", u."sha256", u."size_bytes",
         CASE
           WHEN substring(f.head FROM 1 FOR 5) = '\x255044462d'::bytea THEN 'application/pdf'
           WHEN substring(f.head FROM 1 FOR 8) = '\x89504e470d0a1a0a'::bytea THEN 'image/png'
           WHEN substring(f.head FROM 1 FOR 3) = '\xffd8ff'::bytea THEN 'image/jpeg'
           WHEN EXISTS (SELECT 1 FROM "upload_file_parts" p WHERE p."upload_id" = u."id" AND position('\x00'::bytea IN p."bytes") > 0) THEN 'application/octet-stream'
           WHEN position('\x2c'::bytea IN f.line) > 0 OR position('\x3b'::bytea IN f.line) > 0 OR position('\x09'::bytea IN f.line) > 0 THEN 'text/csv'
           ELSE 'text/plain'
         END,
         u."file_name", u."uploaded_by", u."uploaded_at"
  FROM "uploads" u
  CROSS JOIN LATERAL (
    SELECT h.head, substring(h.head FROM 1 FOR coalesce(nullif(position('\x0a'::bytea IN h.head), 0) - 1, length(h.head))) AS line
    FROM (SELECT coalesce((SELECT substring(p."bytes" FROM 1 FOR 65536) FROM "upload_file_parts" p WHERE p."upload_id" = u."id" AND p."part" = 0), ''::bytea) AS head) h
  ) f;--> statement-breakpoint
SELECT setval(pg_get_serial_sequence('stored_files', 'id'), coalesce((SELECT max("id") FROM "stored_files"), 0) + 1, false);--> statement-breakpoint
INSERT INTO "stored_file_parts" ("file_id", "part", "bytes")
  SELECT "upload_id", "part", "bytes" FROM "upload_file_parts";--> statement-breakpoint
UPDATE "uploads" SET "file_id" = "id";--> statement-breakpoint
ALTER TABLE "uploads" ALTER COLUMN "file_id" SET NOT NULL;

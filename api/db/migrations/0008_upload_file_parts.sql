-- An upload's file moves to upload_file_parts, a megabyte a part (the import writes the parts by COPY;
-- one 10 MB query parameter cost PostgreSQL about five times as long). Files kept so far are split here,
-- byte for byte; the old column goes in the next migration.
CREATE TABLE "upload_file_parts" (
	"upload_id" integer NOT NULL,
	"part" integer NOT NULL,
	"bytes" "bytea" NOT NULL,
	CONSTRAINT "upload_file_parts_upload_id_part_pk" PRIMARY KEY("upload_id","part")
);
--> statement-breakpoint
ALTER TABLE "upload_file_parts" ADD CONSTRAINT "upload_file_parts_upload_id_uploads_id_fk" FOREIGN KEY ("upload_id") REFERENCES "public"."uploads"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
-- LZ4 as for the whole file before (migration 0007); a server built without it keeps the parts as they are.
DO $$
BEGIN
  ALTER TABLE "upload_file_parts" ALTER COLUMN "bytes" SET COMPRESSION lz4;
EXCEPTION WHEN feature_not_supported THEN
  NULL;
END $$;--> statement-breakpoint
ALTER TABLE "uploads" ADD COLUMN "size_bytes" integer;--> statement-breakpoint
UPDATE "uploads" SET "size_bytes" = length("content");--> statement-breakpoint
INSERT INTO "upload_file_parts" ("upload_id", "part", "bytes")
  SELECT u."id", p, substring(u."content" FROM p * 1048576 + 1 FOR 1048576)
  FROM "uploads" u, generate_series(0, (length(u."content") - 1) / 1048576) AS p
  WHERE length(u."content") > 0;--> statement-breakpoint
ALTER TABLE "uploads" ALTER COLUMN "size_bytes" SET NOT NULL;--> statement-breakpoint
ALTER TABLE "uploads" ALTER COLUMN "content" DROP NOT NULL;

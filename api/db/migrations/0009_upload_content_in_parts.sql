-- The files are in upload_file_parts since migration 0008.
ALTER TABLE "uploads" DROP COLUMN "content";

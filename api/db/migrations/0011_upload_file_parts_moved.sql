-- The upload files are in stored_file_parts since migration 0010.
DROP TABLE "upload_file_parts" CASCADE;

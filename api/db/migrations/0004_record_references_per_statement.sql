ALTER TABLE "lots" DROP CONSTRAINT "lots_product_id_products_id_fk";
--> statement-breakpoint
ALTER TABLE "lots" DROP CONSTRAINT "lots_line_id_production_lines_id_fk";
--> statement-breakpoint
ALTER TABLE "measurements" DROP CONSTRAINT "measurements_lot_id_lots_id_fk";
--> statement-breakpoint
ALTER TABLE "measurements" DROP CONSTRAINT "measurements_characteristic_id_characteristics_id_fk";
--> statement-breakpoint
ALTER TABLE "measurements" DROP CONSTRAINT "measurements_upload_id_uploads_id_fk";
--> statement-breakpoint
ALTER TABLE "measurements" DROP CONSTRAINT "measurements_entered_by_users_id_fk";
--> statement-breakpoint
DROP INDEX "lots_product_produced_idx";--> statement-breakpoint
DROP INDEX "measurements_characteristic_idx";--> statement-breakpoint
DROP INDEX "measurements_live_key";--> statement-breakpoint
DROP INDEX "measurements_upload_idx";--> statement-breakpoint
CREATE INDEX "measurements_voided_idx" ON "measurements" USING btree ("characteristic_id") WHERE voided_at is not null;--> statement-breakpoint
CREATE UNIQUE INDEX "measurements_live_key" ON "measurements" USING btree ("characteristic_id","lot_id","replicate") WHERE voided_at is null;--> statement-breakpoint
CREATE INDEX "measurements_upload_idx" ON "measurements" USING brin ("upload_id");--> statement-breakpoint
-- Lots and measurements arrive by the hundred thousand in one upload. A declared foreign key checks
-- each row with its own lookup and lock; these triggers check every reference of a statement at once.
-- The parent side refuses to remove a row that is still referenced. Both sides meet on one advisory
-- lock (shared for writers of references, exclusive for removers of parents), so a parent removed
-- while an insert is in flight is caught by whichever of the two commits second (READ COMMITTED).
CREATE FUNCTION record_reference_missing(parent text, id integer) RETURNS void LANGUAGE plpgsql AS $$
BEGIN
  RAISE EXCEPTION 'insert or update violates a reference: % % does not exist', parent, id USING ERRCODE = 'foreign_key_violation';
END $$;
--> statement-breakpoint
CREATE FUNCTION lots_references_present() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE r record;
BEGIN
  PERFORM pg_advisory_xact_lock_shared(727003);
  -- A statement names a handful of products and lines: one pass groups them, then one lookup each.
  FOR r IN SELECT product_id, line_id FROM new_rows GROUP BY 1, 2 LOOP
    IF NOT EXISTS (SELECT 1 FROM products p WHERE p.id = r.product_id) THEN PERFORM record_reference_missing('product', r.product_id); END IF;
    IF NOT EXISTS (SELECT 1 FROM production_lines p WHERE p.id = r.line_id) THEN PERFORM record_reference_missing('production line', r.line_id); END IF;
  END LOOP;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE FUNCTION measurements_references_present() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE r record; lowest integer; highest integer; named integer; missing integer;
BEGIN
  PERFORM pg_advisory_xact_lock_shared(727003);
  FOR r IN SELECT characteristic_id, upload_id, entered_by FROM new_rows GROUP BY 1, 2, 3 LOOP
    IF NOT EXISTS (SELECT 1 FROM characteristics p WHERE p.id = r.characteristic_id) THEN PERFORM record_reference_missing('characteristic', r.characteristic_id); END IF;
    IF r.upload_id IS NOT NULL AND NOT EXISTS (SELECT 1 FROM uploads p WHERE p.id = r.upload_id) THEN PERFORM record_reference_missing('upload', r.upload_id); END IF;
    IF r.entered_by IS NOT NULL AND NOT EXISTS (SELECT 1 FROM users p WHERE p.id = r.entered_by) THEN PERFORM record_reference_missing('user', r.entered_by); END IF;
  END LOOP;
  -- Lots are many. A file of new lots names ids from a narrow range: when the table holds every id of
  -- that range, every lot named is there, and one range count on the primary key replaces a lookup per
  -- lot. Otherwise each distinct lot is looked up.
  SELECT min(lot_id), max(lot_id), count(*) INTO lowest, highest, named FROM new_rows;
  IF named = 0 THEN RETURN NULL; END IF;
  IF highest - lowest < 2 * named AND (SELECT count(*) FROM lots p WHERE p.id BETWEEN lowest AND highest) = highest - lowest + 1 THEN RETURN NULL; END IF;
  SELECT n.lot_id INTO missing FROM (SELECT DISTINCT lot_id FROM new_rows) n WHERE NOT EXISTS (SELECT 1 FROM lots p WHERE p.id = n.lot_id) LIMIT 1;
  IF FOUND THEN PERFORM record_reference_missing('lot', missing); END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER lots_references_on_insert AFTER INSERT ON lots REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION lots_references_present();
--> statement-breakpoint
CREATE TRIGGER lots_references_on_update AFTER UPDATE ON lots REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION lots_references_present();
--> statement-breakpoint
CREATE TRIGGER measurements_references_on_insert AFTER INSERT ON measurements REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION measurements_references_present();
--> statement-breakpoint
CREATE TRIGGER measurements_references_on_update AFTER UPDATE ON measurements REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION measurements_references_present();
--> statement-breakpoint
-- Parent side. TG_ARGV: the referencing table and its column.
CREATE FUNCTION keep_referenced_parents() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE still integer;
BEGIN
  PERFORM pg_advisory_xact_lock(727003);
  EXECUTE format('SELECT o.id FROM old_rows o WHERE EXISTS (SELECT 1 FROM %I c WHERE c.%I = o.id) LIMIT 1', TG_ARGV[0], TG_ARGV[1]) INTO still;
  IF still IS NOT NULL THEN
    RAISE EXCEPTION 'delete on table "%" violates a reference: % % is still referenced from table "%"', TG_TABLE_NAME, TG_TABLE_NAME, still, TG_ARGV[0] USING ERRCODE = 'foreign_key_violation';
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE FUNCTION keep_parent_ids() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF NEW.id IS DISTINCT FROM OLD.id THEN
    RAISE EXCEPTION 'the id of a row of "%" never changes: other records refer to it', TG_TABLE_NAME USING ERRCODE = 'foreign_key_violation';
  END IF;
  RETURN NEW;
END $$;
--> statement-breakpoint
CREATE TRIGGER products_kept_for_lots AFTER DELETE ON products REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION keep_referenced_parents('lots', 'product_id');
--> statement-breakpoint
CREATE TRIGGER production_lines_kept_for_lots AFTER DELETE ON production_lines REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION keep_referenced_parents('lots', 'line_id');
--> statement-breakpoint
CREATE TRIGGER lots_kept_for_measurements AFTER DELETE ON lots REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION keep_referenced_parents('measurements', 'lot_id');
--> statement-breakpoint
CREATE TRIGGER characteristics_kept_for_measurements AFTER DELETE ON characteristics REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION keep_referenced_parents('measurements', 'characteristic_id');
--> statement-breakpoint
CREATE TRIGGER uploads_kept_for_measurements AFTER DELETE ON uploads REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION keep_referenced_parents('measurements', 'upload_id');
--> statement-breakpoint
CREATE TRIGGER users_kept_for_measurements AFTER DELETE ON users REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION keep_referenced_parents('measurements', 'entered_by');
--> statement-breakpoint
CREATE TRIGGER products_id_kept BEFORE UPDATE OF id ON products FOR EACH ROW EXECUTE FUNCTION keep_parent_ids();
--> statement-breakpoint
CREATE TRIGGER production_lines_id_kept BEFORE UPDATE OF id ON production_lines FOR EACH ROW EXECUTE FUNCTION keep_parent_ids();
--> statement-breakpoint
CREATE TRIGGER lots_id_kept BEFORE UPDATE OF id ON lots FOR EACH ROW EXECUTE FUNCTION keep_parent_ids();
--> statement-breakpoint
CREATE TRIGGER characteristics_id_kept BEFORE UPDATE OF id ON characteristics FOR EACH ROW EXECUTE FUNCTION keep_parent_ids();
--> statement-breakpoint
CREATE TRIGGER uploads_id_kept BEFORE UPDATE OF id ON uploads FOR EACH ROW EXECUTE FUNCTION keep_parent_ids();
--> statement-breakpoint
CREATE TRIGGER users_id_kept BEFORE UPDATE OF id ON users FOR EACH ROW EXECUTE FUNCTION keep_parent_ids();
--> statement-breakpoint
-- The original file is kept as evidence and read back whole; compressing it on the way in costs more
-- time than the disk it saves.
ALTER TABLE "uploads" ALTER COLUMN "content" SET STORAGE EXTERNAL;

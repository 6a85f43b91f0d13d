ALTER TABLE "audit_events" ADD COLUMN "seq" bigint;--> statement-breakpoint
ALTER TABLE "audit_events" ADD COLUMN "prev_hash" text;--> statement-breakpoint
ALTER TABLE "audit_events" ADD COLUMN "hash" text;--> statement-breakpoint
CREATE UNIQUE INDEX "audit_events_seq_idx" ON "audit_events" USING btree ("seq") WHERE seq is not null;--> statement-breakpoint
CREATE INDEX "audit_events_actor_idx" ON "audit_events" USING btree ("actor_id","at");--> statement-breakpoint
-- The hash of one audit event: SHA-256 (hex) of the UTF-8 text of the JSON array
-- [previous hash, seq, at in UTC with microseconds, actor id, action, entity, entity id, before, after, reason]
-- as PostgreSQL prints jsonb (keys of objects in its own order, so the text depends on the content only).
CREATE FUNCTION audit_event_hash(p_prev text, p_seq bigint, p_at timestamptz, p_actor integer, p_action text, p_entity text, p_entity_id text, p_before jsonb, p_after jsonb, p_reason text)
RETURNS text LANGUAGE sql IMMUTABLE PARALLEL SAFE AS $$
  SELECT encode(sha256(convert_to(jsonb_build_array(
    p_prev, p_seq, to_char(p_at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.US"Z"'), p_actor, p_action, p_entity, p_entity_id, p_before, p_after, p_reason
  )::text, 'UTF8')), 'hex')
$$;
--> statement-breakpoint
-- Seals one row at its transaction's commit (a deferred constraint trigger): the next place in the chain after
-- the last sealed row. The advisory lock is held from here to the commit, so chains never fork and writers wait
-- only for each other's commits, never for a whole transaction.
CREATE FUNCTION audit_events_seal() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  last_seq bigint;
  last_hash text;
  cur audit_events%ROWTYPE;
BEGIN
  PERFORM pg_advisory_xact_lock(7140531);
  SELECT * INTO cur FROM audit_events WHERE id = NEW.id;
  IF cur.seq IS NOT NULL THEN RETURN NULL; END IF;
  SELECT seq, hash INTO last_seq, last_hash FROM audit_events WHERE seq IS NOT NULL ORDER BY seq DESC LIMIT 1;
  last_seq := coalesce(last_seq, 0) + 1;
  last_hash := coalesce(last_hash, repeat('0', 64));
  UPDATE audit_events
     SET seq = last_seq, prev_hash = last_hash,
         hash = audit_event_hash(last_hash, last_seq, cur.at, cur.actor_id, cur.action, cur.entity, cur.entity_id, cur.before, cur.after, cur.reason)
   WHERE id = NEW.id;
  RETURN NULL;
END $$;
--> statement-breakpoint
-- Append-only: an insert cannot bring its own chain values; a committed (sealed) row is never changed or
-- deleted; an unsealed row exists only inside the transaction that wrote it, which may still edit it; sealing
-- must give exactly the hash of the row's content.
CREATE FUNCTION audit_events_guard() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'INSERT' THEN
    NEW.seq := NULL; NEW.prev_hash := NULL; NEW.hash := NULL;
    RETURN NEW;
  END IF;
  IF TG_OP = 'UPDATE' AND OLD.seq IS NULL THEN
    IF NEW.seq IS NULL THEN
      NEW.prev_hash := NULL; NEW.hash := NULL;
      RETURN NEW;
    END IF;
    IF NEW.hash IS NOT DISTINCT FROM audit_event_hash(NEW.prev_hash, NEW.seq, NEW.at, NEW.actor_id, NEW.action, NEW.entity, NEW.entity_id, NEW.before, NEW.after, NEW.reason) THEN
      RETURN NEW;
    END IF;
  END IF;
  RAISE EXCEPTION 'The audit trail is append-only: % of audit event % refused', TG_OP, coalesce(OLD.id, NEW.id)::text
    USING ERRCODE = 'insufficient_privilege';
END $$;
--> statement-breakpoint
CREATE FUNCTION audit_events_refuse_truncate() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  RAISE EXCEPTION 'The audit trail is append-only: TRUNCATE refused' USING ERRCODE = 'insufficient_privilege';
END $$;
--> statement-breakpoint
-- Re-seals the whole chain from its first row. Only the demo seed calls it, with the guard trigger disabled by
-- the table's owner, after dating its story's rows; an application role can neither disable nor call past it.
CREATE FUNCTION audit_events_reseal() RETURNS bigint LANGUAGE plpgsql AS $$
DECLARE
  r audit_events%ROWTYPE;
  s bigint := 0;
  h text := repeat('0', 64);
  nh text;
BEGIN
  FOR r IN SELECT * FROM audit_events ORDER BY seq NULLS LAST, id LOOP
    s := s + 1;
    nh := audit_event_hash(h, s, r.at, r.actor_id, r.action, r.entity, r.entity_id, r.before, r.after, r.reason);
    IF r.seq IS DISTINCT FROM s OR r.prev_hash IS DISTINCT FROM h OR r.hash IS DISTINCT FROM nh THEN
      UPDATE audit_events SET seq = s, prev_hash = h, hash = nh WHERE id = r.id;
    END IF;
    h := nh;
  END LOOP;
  RETURN s;
END $$;
--> statement-breakpoint
-- The rows written before the chain existed are sealed in the order they were written.
SELECT audit_events_reseal();
--> statement-breakpoint
CREATE TRIGGER audit_events_append_only BEFORE INSERT OR UPDATE OR DELETE ON audit_events FOR EACH ROW EXECUTE FUNCTION audit_events_guard();
--> statement-breakpoint
CREATE TRIGGER audit_events_no_truncate BEFORE TRUNCATE ON audit_events FOR EACH STATEMENT EXECUTE FUNCTION audit_events_refuse_truncate();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER audit_events_seal AFTER INSERT ON audit_events DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION audit_events_seal();

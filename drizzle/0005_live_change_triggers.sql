-- Live channel: every change of a job, a node or the queue switches leaves one row in
-- live_changes and a NOTIFY on 'nullsmith_live', whichever process made it, so every server's
-- WebSocket fan-out sees it (several nodes on one PostgreSQL; PGlite in-process the same way).
CREATE OR REPLACE FUNCTION nullsmith_live_change() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  r text;
BEGIN
  IF TG_ARGV[0] = 'queue' THEN
    r := '1';
  ELSE
    r := NEW.id::text;
  END IF;
  INSERT INTO live_changes (topic, ref) VALUES (TG_ARGV[0], r);
  PERFORM pg_notify('nullsmith_live', TG_ARGV[0]);
  RETURN NULL;
END
$$;
--> statement-breakpoint
CREATE TRIGGER jobs_live_change AFTER INSERT OR UPDATE ON jobs FOR EACH ROW EXECUTE FUNCTION nullsmith_live_change('job');
--> statement-breakpoint
CREATE TRIGGER nodes_live_change AFTER INSERT OR UPDATE ON nodes FOR EACH ROW EXECUTE FUNCTION nullsmith_live_change('node');
--> statement-breakpoint
CREATE TRIGGER queue_state_live_change AFTER INSERT OR UPDATE ON queue_state FOR EACH ROW EXECUTE FUNCTION nullsmith_live_change('queue');

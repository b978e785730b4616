-- Servers listening on sigmaflow_run_events hear of every state change and every stored log chunk of a
-- run. The notifications are raised by triggers, in the same transaction as the row (delivered at commit),
-- so the engine does not spend a statement per change on them. Payloads:
--   {"runId": "...", "type": "state", "state": "<to_state>"}   after a run_events row
--   {"runId": "...", "type": "log", "seq": <seq>}               after a run_log_chunks row
CREATE FUNCTION sigmaflow_notify_run_event() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM pg_notify('sigmaflow_run_events',
    json_build_object('runId', NEW.run_id, 'type', 'state', 'state', NEW.to_state)::text);
  RETURN NULL;
END
$$;
--> statement-breakpoint
CREATE FUNCTION sigmaflow_notify_run_log() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM pg_notify('sigmaflow_run_events',
    json_build_object('runId', NEW.run_id, 'type', 'log', 'seq', NEW.seq)::text);
  RETURN NULL;
END
$$;
--> statement-breakpoint
CREATE TRIGGER run_events_notify AFTER INSERT ON run_events
  FOR EACH ROW EXECUTE FUNCTION sigmaflow_notify_run_event();
--> statement-breakpoint
CREATE TRIGGER run_log_chunks_notify AFTER INSERT ON run_log_chunks
  FOR EACH ROW EXECUTE FUNCTION sigmaflow_notify_run_log();

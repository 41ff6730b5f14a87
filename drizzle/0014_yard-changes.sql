-- The API keeps what Tonight reads per depot (apps/api/src/yard/yard-service.ts, YardNights) and
-- forgets a depot's when this notification names it: any change to its plans, the yard's reports,
-- confirmations and shift acknowledgements, or the depot itself.
-- One function for every such channel: the channel is the trigger's argument, the payload the
-- depot's id (the row's own id on depots).
CREATE FUNCTION "nightyard_depot_changed"() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_TABLE_NAME = 'depots' THEN
    PERFORM pg_notify(TG_ARGV[0], OLD.id::text);
  ELSIF TG_OP = 'DELETE' THEN
    PERFORM pg_notify(TG_ARGV[0], OLD.depot_id::text);
  ELSE
    PERFORM pg_notify(TG_ARGV[0], NEW.depot_id::text);
    IF TG_OP = 'UPDATE' AND OLD.depot_id IS DISTINCT FROM NEW.depot_id THEN
      PERFORM pg_notify(TG_ARGV[0], OLD.depot_id::text);
    END IF;
  END IF;
  RETURN NULL;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER "plans_yard_changed" AFTER INSERT OR UPDATE OR DELETE ON "plans" FOR EACH ROW EXECUTE FUNCTION "nightyard_depot_changed"('nightyard_yard_changed');
--> statement-breakpoint
CREATE TRIGGER "yard_reports_yard_changed" AFTER INSERT OR UPDATE OR DELETE ON "yard_reports" FOR EACH ROW EXECUTE FUNCTION "nightyard_depot_changed"('nightyard_yard_changed');
--> statement-breakpoint
CREATE TRIGGER "yard_confirmations_yard_changed" AFTER INSERT OR UPDATE OR DELETE ON "yard_confirmations" FOR EACH ROW EXECUTE FUNCTION "nightyard_depot_changed"('nightyard_yard_changed');
--> statement-breakpoint
CREATE TRIGGER "shift_acknowledgements_yard_changed" AFTER INSERT OR UPDATE OR DELETE ON "shift_acknowledgements" FOR EACH ROW EXECUTE FUNCTION "nightyard_depot_changed"('nightyard_yard_changed');
--> statement-breakpoint
CREATE TRIGGER "depots_yard_changed" AFTER UPDATE OR DELETE ON "depots" FOR EACH ROW EXECUTE FUNCTION "nightyard_depot_changed"('nightyard_yard_changed');

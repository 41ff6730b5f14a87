-- The API keeps the costs month's inputs per depot (apps/api/src/costs/costs-service.ts, CostsInputs)
-- and forgets a depot's when this notification names it: any change to the rows they come from.
-- A bulk write (a meter import, a day's runs) sends one notification: PostgreSQL folds identical
-- notifications of one transaction into one. The function is 0014's (the channel its argument).
CREATE FUNCTION "nightyard_rate_plan_changed"() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM pg_notify('nightyard_rate_plan_changed', OLD.id::text);
  RETURN NULL;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER "plans_costs_changed" AFTER INSERT OR UPDATE OR DELETE ON "plans" FOR EACH ROW EXECUTE FUNCTION "nightyard_depot_changed"('nightyard_costs_changed');
--> statement-breakpoint
CREATE TRIGGER "runs_costs_changed" AFTER INSERT OR UPDATE OR DELETE ON "runs" FOR EACH ROW EXECUTE FUNCTION "nightyard_depot_changed"('nightyard_costs_changed');
--> statement-breakpoint
CREATE TRIGGER "buses_costs_changed" AFTER INSERT OR UPDATE OR DELETE ON "buses" FOR EACH ROW EXECUTE FUNCTION "nightyard_depot_changed"('nightyard_costs_changed');
--> statement-breakpoint
CREATE TRIGGER "service_days_costs_changed" AFTER INSERT OR UPDATE OR DELETE ON "service_days" FOR EACH ROW EXECUTE FUNCTION "nightyard_depot_changed"('nightyard_costs_changed');
--> statement-breakpoint
CREATE TRIGGER "meter_intervals_costs_changed" AFTER INSERT OR UPDATE OR DELETE ON "meter_intervals" FOR EACH ROW EXECUTE FUNCTION "nightyard_depot_changed"('nightyard_costs_changed');
--> statement-breakpoint
CREATE TRIGGER "meter_imports_costs_changed" AFTER INSERT OR UPDATE OR DELETE ON "meter_imports" FOR EACH ROW EXECUTE FUNCTION "nightyard_depot_changed"('nightyard_costs_changed');
--> statement-breakpoint
CREATE TRIGGER "billing_peaks_costs_changed" AFTER INSERT OR UPDATE OR DELETE ON "billing_peaks" FOR EACH ROW EXECUTE FUNCTION "nightyard_depot_changed"('nightyard_costs_changed');
--> statement-breakpoint
CREATE TRIGGER "depot_rate_plans_costs_changed" AFTER INSERT OR UPDATE OR DELETE ON "depot_rate_plans" FOR EACH ROW EXECUTE FUNCTION "nightyard_depot_changed"('nightyard_costs_changed');
--> statement-breakpoint
CREATE TRIGGER "depots_costs_changed" AFTER UPDATE OR DELETE ON "depots" FOR EACH ROW EXECUTE FUNCTION "nightyard_depot_changed"('nightyard_costs_changed');
--> statement-breakpoint
CREATE TRIGGER "rate_plans_changed" AFTER UPDATE OR DELETE ON "rate_plans" FOR EACH ROW EXECUTE FUNCTION "nightyard_rate_plan_changed"();

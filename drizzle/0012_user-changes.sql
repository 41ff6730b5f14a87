-- The API keeps signed-in users in memory between requests (apps/api/src/auth/known-users.ts) and
-- forgets one when this notification names it: any change that bears on access (status, roles,
-- organisation) or on what a request reports of its caller (name, e-mail), and any delete.
-- Sign-in times and password hashes change nothing the API remembers, so they stay quiet.
CREATE FUNCTION "nightyard_user_changed"() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM pg_notify('nightyard_user_changed', OLD.id::text);
  RETURN NULL;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER "users_changed_update" AFTER UPDATE ON "users" FOR EACH ROW
  WHEN ((OLD.status, OLD.roles, OLD.organisation_id, OLD.name, OLD.email) IS DISTINCT FROM (NEW.status, NEW.roles, NEW.organisation_id, NEW.name, NEW.email))
  EXECUTE FUNCTION "nightyard_user_changed"();
--> statement-breakpoint
CREATE TRIGGER "users_changed_delete" AFTER DELETE ON "users" FOR EACH ROW EXECUTE FUNCTION "nightyard_user_changed"();

CREATE TABLE "user_depots" (
	"user_id" uuid NOT NULL,
	"depot_id" uuid NOT NULL,
	CONSTRAINT "user_depots_user_id_depot_id_pk" PRIMARY KEY("user_id","depot_id")
);
--> statement-breakpoint
ALTER TABLE "users" ADD COLUMN "chosen_depot_id" uuid;--> statement-breakpoint
ALTER TABLE "user_depots" ADD CONSTRAINT "user_depots_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "user_depots" ADD CONSTRAINT "user_depots_depot_id_depots_id_fk" FOREIGN KEY ("depot_id") REFERENCES "public"."depots"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "user_depots_depot_idx" ON "user_depots" USING btree ("depot_id");--> statement-breakpoint
ALTER TABLE "users" ADD CONSTRAINT "users_chosen_depot_id_depots_id_fk" FOREIGN KEY ("chosen_depot_id") REFERENCES "public"."depots"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
-- Existing installations keep working: every non-admin person is assigned every depot of their
-- organisation (administrators see every depot whatever they hold).
INSERT INTO "user_depots" ("user_id", "depot_id")
  SELECT u.id, d.id FROM "users" u JOIN "depots" d ON d.organisation_id = u.organisation_id
  WHERE NOT ('admin' = ANY(u.roles));
--> statement-breakpoint
-- A person's depots bear on access: the signed-in user cache (apps/api/src/auth/known-users.ts)
-- forgets the person when an assignment is added or removed (also by the cascade of a depot's or
-- a person's delete), naming the row's user on 0012's channel.
CREATE FUNCTION "nightyard_user_depots_changed"() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'DELETE' THEN
    PERFORM pg_notify('nightyard_user_changed', OLD.user_id::text);
  ELSE
    PERFORM pg_notify('nightyard_user_changed', NEW.user_id::text);
    IF TG_OP = 'UPDATE' AND OLD.user_id IS DISTINCT FROM NEW.user_id THEN
      PERFORM pg_notify('nightyard_user_changed', OLD.user_id::text);
    END IF;
  END IF;
  RETURN NULL;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER "user_depots_changed" AFTER INSERT OR UPDATE OR DELETE ON "user_depots" FOR EACH ROW EXECUTE FUNCTION "nightyard_user_depots_changed"();

CREATE TYPE "public"."yard_report_kind" AS ENUM('bus_late', 'bus_absent', 'charger_out', 'soc_reading');--> statement-breakpoint
CREATE TABLE "shift_acknowledgements" (
	"user_id" uuid NOT NULL,
	"depot_id" uuid NOT NULL,
	"service_date" date NOT NULL,
	"acknowledged_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "shift_acknowledgements_user_id_depot_id_service_date_pk" PRIMARY KEY("user_id","depot_id","service_date")
);
--> statement-breakpoint
CREATE TABLE "yard_confirmations" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"organisation_id" uuid NOT NULL,
	"depot_id" uuid NOT NULL,
	"service_date" date NOT NULL,
	"step_key" text NOT NULL,
	"plan_id" uuid NOT NULL,
	"confirmed_by" uuid,
	"confirmed_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "yard_reports" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"organisation_id" uuid NOT NULL,
	"depot_id" uuid NOT NULL,
	"service_date" date NOT NULL,
	"kind" "yard_report_kind" NOT NULL,
	"bus" text,
	"charger" text,
	"expected_at" timestamp with time zone,
	"soc_pct" double precision,
	"reason" text,
	"plan_id" uuid NOT NULL,
	"revision_id" uuid,
	"reported_by" uuid,
	"reported_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "plans" ADD COLUMN "replan_state" jsonb;--> statement-breakpoint
ALTER TABLE "shift_acknowledgements" ADD CONSTRAINT "shift_acknowledgements_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "shift_acknowledgements" ADD CONSTRAINT "shift_acknowledgements_depot_id_depots_id_fk" FOREIGN KEY ("depot_id") REFERENCES "public"."depots"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "yard_confirmations" ADD CONSTRAINT "yard_confirmations_organisation_id_organisations_id_fk" FOREIGN KEY ("organisation_id") REFERENCES "public"."organisations"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "yard_confirmations" ADD CONSTRAINT "yard_confirmations_depot_id_depots_id_fk" FOREIGN KEY ("depot_id") REFERENCES "public"."depots"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "yard_confirmations" ADD CONSTRAINT "yard_confirmations_plan_id_plans_id_fk" FOREIGN KEY ("plan_id") REFERENCES "public"."plans"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "yard_confirmations" ADD CONSTRAINT "yard_confirmations_confirmed_by_users_id_fk" FOREIGN KEY ("confirmed_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "yard_reports" ADD CONSTRAINT "yard_reports_organisation_id_organisations_id_fk" FOREIGN KEY ("organisation_id") REFERENCES "public"."organisations"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "yard_reports" ADD CONSTRAINT "yard_reports_depot_id_depots_id_fk" FOREIGN KEY ("depot_id") REFERENCES "public"."depots"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "yard_reports" ADD CONSTRAINT "yard_reports_plan_id_plans_id_fk" FOREIGN KEY ("plan_id") REFERENCES "public"."plans"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "yard_reports" ADD CONSTRAINT "yard_reports_revision_id_plans_id_fk" FOREIGN KEY ("revision_id") REFERENCES "public"."plans"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "yard_reports" ADD CONSTRAINT "yard_reports_reported_by_users_id_fk" FOREIGN KEY ("reported_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "yard_confirmations_step_key" ON "yard_confirmations" USING btree ("depot_id","service_date","step_key");
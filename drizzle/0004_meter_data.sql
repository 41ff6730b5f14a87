CREATE TABLE "meter_imports" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"organisation_id" uuid NOT NULL,
	"depot_id" uuid NOT NULL,
	"file_name" text NOT NULL,
	"format" text NOT NULL,
	"billing_period_start" date NOT NULL,
	"intervals" integer NOT NULL,
	"duplicates" integer NOT NULL,
	"gaps" jsonb NOT NULL,
	"imported_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "meter_intervals" (
	"organisation_id" uuid NOT NULL,
	"depot_id" uuid NOT NULL,
	"starts_at" timestamp with time zone NOT NULL,
	"minutes" integer NOT NULL,
	"kwh" double precision NOT NULL,
	"import_id" uuid NOT NULL,
	CONSTRAINT "meter_intervals_depot_id_starts_at_pk" PRIMARY KEY("depot_id","starts_at")
);
--> statement-breakpoint
ALTER TABLE "meter_imports" ADD CONSTRAINT "meter_imports_organisation_id_organisations_id_fk" FOREIGN KEY ("organisation_id") REFERENCES "public"."organisations"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "meter_imports" ADD CONSTRAINT "meter_imports_depot_id_depots_id_fk" FOREIGN KEY ("depot_id") REFERENCES "public"."depots"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "meter_imports" ADD CONSTRAINT "meter_imports_imported_by_users_id_fk" FOREIGN KEY ("imported_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "meter_intervals" ADD CONSTRAINT "meter_intervals_organisation_id_organisations_id_fk" FOREIGN KEY ("organisation_id") REFERENCES "public"."organisations"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "meter_intervals" ADD CONSTRAINT "meter_intervals_depot_id_depots_id_fk" FOREIGN KEY ("depot_id") REFERENCES "public"."depots"("id") ON DELETE cascade ON UPDATE no action;
CREATE TYPE "public"."soc_source" AS ENUM('typed', 'uploaded', 'estimated');--> statement-breakpoint
CREATE TABLE "service_days" (
	"organisation_id" uuid NOT NULL,
	"depot_id" uuid NOT NULL,
	"service_date" date NOT NULL,
	"forecast_low_f" double precision,
	CONSTRAINT "service_days_depot_id_service_date_pk" PRIMARY KEY("depot_id","service_date")
);
--> statement-breakpoint
ALTER TABLE "depots" ADD COLUMN "cold_weather_factors" jsonb DEFAULT '[{"belowF":50,"factor":1.1},{"belowF":32,"factor":1.25},{"belowF":14,"factor":1.4}]'::jsonb NOT NULL;--> statement-breakpoint
ALTER TABLE "runs" ADD COLUMN "arrival_soc_pct" double precision;--> statement-breakpoint
ALTER TABLE "runs" ADD COLUMN "arrival_soc_source" "soc_source";--> statement-breakpoint
ALTER TABLE "service_days" ADD CONSTRAINT "service_days_organisation_id_organisations_id_fk" FOREIGN KEY ("organisation_id") REFERENCES "public"."organisations"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "service_days" ADD CONSTRAINT "service_days_depot_id_depots_id_fk" FOREIGN KEY ("depot_id") REFERENCES "public"."depots"("id") ON DELETE cascade ON UPDATE no action;
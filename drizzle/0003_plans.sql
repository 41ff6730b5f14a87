CREATE TYPE "public"."plan_job_status" AS ENUM('queued', 'running', 'done', 'failed');--> statement-breakpoint
CREATE TYPE "public"."plan_kind" AS ENUM('generated', 'what-if', 'revision');--> statement-breakpoint
CREATE TYPE "public"."plan_state" AS ENUM('draft', 'published', 'superseded');--> statement-breakpoint
CREATE TABLE "plans" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"organisation_id" uuid NOT NULL,
	"depot_id" uuid NOT NULL,
	"service_date" date NOT NULL,
	"version" integer NOT NULL,
	"kind" "plan_kind" DEFAULT 'generated' NOT NULL,
	"state" "plan_state" DEFAULT 'draft' NOT NULL,
	"status" "plan_job_status" DEFAULT 'queued' NOT NULL,
	"stage" text DEFAULT 'Waiting for a worker' NOT NULL,
	"error" text,
	"includes_midday" boolean DEFAULT true NOT NULL,
	"scenario" jsonb NOT NULL,
	"notes" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"result" jsonb,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"published_at" timestamp with time zone,
	"published_by" uuid
);
--> statement-breakpoint
ALTER TABLE "plans" ADD CONSTRAINT "plans_organisation_id_organisations_id_fk" FOREIGN KEY ("organisation_id") REFERENCES "public"."organisations"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plans" ADD CONSTRAINT "plans_depot_id_depots_id_fk" FOREIGN KEY ("depot_id") REFERENCES "public"."depots"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plans" ADD CONSTRAINT "plans_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plans" ADD CONSTRAINT "plans_published_by_users_id_fk" FOREIGN KEY ("published_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "plans_depot_date_version_key" ON "plans" USING btree ("depot_id","service_date","version");--> statement-breakpoint
CREATE UNIQUE INDEX "plans_one_published_key" ON "plans" USING btree ("depot_id","service_date") WHERE "plans"."state" = 'published';
ALTER TABLE "chargers" ADD COLUMN "out_from" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "chargers" ADD COLUMN "out_until" timestamp with time zone;
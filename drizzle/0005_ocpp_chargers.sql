ALTER TABLE "chargers" ADD COLUMN "ocpp_identity" text;--> statement-breakpoint
ALTER TABLE "chargers" ADD COLUMN "ocpp_password_hash" text;--> statement-breakpoint
ALTER TABLE "chargers" ADD COLUMN "connector_id" integer DEFAULT 1 NOT NULL;--> statement-breakpoint
ALTER TABLE "chargers" ADD COLUMN "evse_id" integer DEFAULT 1 NOT NULL;--> statement-breakpoint
ALTER TABLE "chargers" ADD COLUMN "live_status" text;--> statement-breakpoint
ALTER TABLE "chargers" ADD COLUMN "live_power_w" double precision;--> statement-breakpoint
ALTER TABLE "chargers" ADD COLUMN "live_seen_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "chargers" ADD COLUMN "live_connected" boolean DEFAULT false NOT NULL;--> statement-breakpoint
CREATE UNIQUE INDEX "chargers_ocpp_identity_key" ON "chargers" USING btree ("ocpp_identity");
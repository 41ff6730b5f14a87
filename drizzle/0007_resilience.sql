CREATE TABLE "password_reset_requests" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"email" text NOT NULL,
	"ip" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "plans" ADD COLUMN "attempts" integer DEFAULT 0 NOT NULL;--> statement-breakpoint
CREATE INDEX "password_reset_requests_email_idx" ON "password_reset_requests" USING btree ("email","created_at");--> statement-breakpoint
CREATE INDEX "password_reset_requests_ip_idx" ON "password_reset_requests" USING btree ("ip","created_at");
ALTER TYPE "public"."yard_report_kind" ADD VALUE 'step_missed';--> statement-breakpoint
ALTER TABLE "yard_confirmations" ADD COLUMN "outcome" text DEFAULT 'done' NOT NULL;
ALTER TABLE "price_observations" ADD COLUMN "version" integer DEFAULT 1 NOT NULL;--> statement-breakpoint
ALTER TABLE "farm_records" ADD COLUMN "version" integer DEFAULT 1 NOT NULL;
ALTER TABLE "farms" DROP CONSTRAINT "farms_owner_user_id_unique";--> statement-breakpoint
ALTER TABLE "farms" DROP CONSTRAINT "farms_owner_user_id_users_id_fk";
--> statement-breakpoint
ALTER TABLE "users" ADD COLUMN "farm_id" integer;--> statement-breakpoint
ALTER TABLE "users" ADD CONSTRAINT "users_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "users_farm_id_idx" ON "users" USING btree ("farm_id");--> statement-breakpoint
-- Each farm's one linked member keeps the farm (several members per farm from now on).
UPDATE "users" SET "farm_id" = "farms"."id" FROM "farms" WHERE "farms"."owner_user_id" = "users"."id";--> statement-breakpoint
ALTER TABLE "farms" DROP COLUMN "owner_user_id";
CREATE TABLE "contracts" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "contracts_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"farm_id" integer NOT NULL,
	"season_id" integer NOT NULL,
	"item_id" integer NOT NULL,
	"quantity" double precision NOT NULL,
	"price_cents" integer NOT NULL,
	"currency" text DEFAULT 'EUR' NOT NULL,
	"delivery_from" text NOT NULL,
	"delivery_to" text NOT NULL,
	"status" text DEFAULT 'offered' NOT NULL,
	"reference" text NOT NULL,
	"version" integer DEFAULT 1 NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "contracts_quantity_check" CHECK ("contracts"."quantity" > 0),
	CONSTRAINT "contracts_price_check" CHECK ("contracts"."price_cents" > 0),
	CONSTRAINT "contracts_status_check" CHECK ("contracts"."status" in ('offered','signed','delivered','cancelled')),
	CONSTRAINT "contracts_window_check" CHECK ("contracts"."delivery_from" <= "contracts"."delivery_to")
);
--> statement-breakpoint
ALTER TABLE "imports" DROP CONSTRAINT "imports_kind_check";--> statement-breakpoint
ALTER TABLE "contracts" ADD CONSTRAINT "contracts_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "contracts" ADD CONSTRAINT "contracts_season_id_seasons_id_fk" FOREIGN KEY ("season_id") REFERENCES "public"."seasons"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "contracts" ADD CONSTRAINT "contracts_item_id_items_id_fk" FOREIGN KEY ("item_id") REFERENCES "public"."items"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "contracts_reference_unique" ON "contracts" USING btree ("reference");--> statement-breakpoint
CREATE INDEX "contracts_season_idx" ON "contracts" USING btree ("season_id");--> statement-breakpoint
CREATE INDEX "contracts_farm_idx" ON "contracts" USING btree ("farm_id");--> statement-breakpoint
ALTER TABLE "imports" ADD CONSTRAINT "imports_kind_check" CHECK ("imports"."kind" in ('prices','records','observations','contracts'));
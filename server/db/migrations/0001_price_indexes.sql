CREATE TABLE "price_index_values" (
	"index_id" integer NOT NULL,
	"season_id" integer NOT NULL,
	"value" double precision NOT NULL
);
--> statement-breakpoint
CREATE TABLE "price_indexes" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "price_indexes_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"name" text NOT NULL,
	"base" text NOT NULL,
	"source" text NOT NULL,
	CONSTRAINT "price_indexes_name_unique" UNIQUE("name")
);
--> statement-breakpoint
ALTER TABLE "price_index_values" ADD CONSTRAINT "price_index_values_index_id_price_indexes_id_fk" FOREIGN KEY ("index_id") REFERENCES "public"."price_indexes"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "price_index_values" ADD CONSTRAINT "price_index_values_season_id_seasons_id_fk" FOREIGN KEY ("season_id") REFERENCES "public"."seasons"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "price_index_values_unique" ON "price_index_values" USING btree ("index_id","season_id");
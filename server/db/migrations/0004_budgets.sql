CREATE TABLE "budgets" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "budgets_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"name" text NOT NULL,
	"source" jsonb NOT NULL,
	"products" jsonb NOT NULL,
	"booking_plan" jsonb NOT NULL,
	"scenarios" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"options" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"result" jsonb NOT NULL,
	"software_version" text NOT NULL,
	"created_by" integer,
	"updated_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "fertiliser_products" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "fertiliser_products_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"name" text NOT NULL,
	"n_pct" double precision DEFAULT 0 NOT NULL,
	"p2o5_pct" double precision DEFAULT 0 NOT NULL,
	"k2o_pct" double precision DEFAULT 0 NOT NULL,
	"form" text NOT NULL,
	"price_per_t" double precision NOT NULL,
	"currency" text NOT NULL,
	"lot_t" double precision NOT NULL,
	"supplier" text DEFAULT '' NOT NULL,
	"grade_source" text DEFAULT '' NOT NULL,
	"price_note" text DEFAULT '' NOT NULL,
	"active" boolean DEFAULT true NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "fertiliser_products_name_unique" UNIQUE("name"),
	CONSTRAINT "fertiliser_products_form_check" CHECK ("fertiliser_products"."form" in ('solid','liquid','gas')),
	CONSTRAINT "fertiliser_products_grade_check" CHECK ("fertiliser_products"."n_pct" >= 0 and "fertiliser_products"."p2o5_pct" >= 0 and "fertiliser_products"."k2o_pct" >= 0 and "fertiliser_products"."n_pct" + "fertiliser_products"."p2o5_pct" + "fertiliser_products"."k2o_pct" > 0 and "fertiliser_products"."n_pct" + "fertiliser_products"."p2o5_pct" + "fertiliser_products"."k2o_pct" <= 100),
	CONSTRAINT "fertiliser_products_price_check" CHECK ("fertiliser_products"."price_per_t" > 0 and "fertiliser_products"."lot_t" > 0)
);
--> statement-breakpoint
ALTER TABLE "budgets" ADD CONSTRAINT "budgets_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "budgets" ADD CONSTRAINT "budgets_updated_by_users_id_fk" FOREIGN KEY ("updated_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;
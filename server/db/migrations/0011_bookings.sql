CREATE TABLE "booking_payments" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "booking_payments_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"booking_id" integer NOT NULL,
	"booking_version" integer NOT NULL,
	"idempotency_key" text NOT NULL,
	"checkout_session_id" text,
	"checkout_url" text,
	"payment_intent_id" text,
	"refund_id" text,
	"amount_minor" integer NOT NULL,
	"currency" text NOT NULL,
	"state" text DEFAULT 'pending' NOT NULL,
	"last_source" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"paid_at" timestamp with time zone,
	"refunded_at" timestamp with time zone,
	CONSTRAINT "booking_payments_idempotency_key_unique" UNIQUE("idempotency_key"),
	CONSTRAINT "booking_payments_checkout_session_id_unique" UNIQUE("checkout_session_id"),
	CONSTRAINT "booking_payments_state_check" CHECK ("booking_payments"."state" in ('pending','paid','failed','refunded')),
	CONSTRAINT "booking_payments_amount_check" CHECK ("booking_payments"."amount_minor" > 0)
);
--> statement-breakpoint
CREATE TABLE "booking_rounds" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "booking_rounds_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"season_id" integer NOT NULL,
	"budget_id" integer NOT NULL,
	"discount_deadline" date NOT NULL,
	"discount_bp" integer NOT NULL,
	"vat_bp" integer NOT NULL,
	"currency" text NOT NULL,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "booking_rounds_season_id_unique" UNIQUE("season_id"),
	CONSTRAINT "booking_rounds_rates_check" CHECK ("booking_rounds"."discount_bp" >= 0 and "booking_rounds"."discount_bp" <= 5000 and "booking_rounds"."vat_bp" >= 0 and "booking_rounds"."vat_bp" <= 5000)
);
--> statement-breakpoint
CREATE TABLE "bookings" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "bookings_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"round_id" integer NOT NULL,
	"farm_id" integer NOT NULL,
	"season_id" integer NOT NULL,
	"budget_id" integer NOT NULL,
	"lines" jsonb NOT NULL,
	"delivery_month" text NOT NULL,
	"currency" text NOT NULL,
	"list_minor" integer NOT NULL,
	"discount_bp" integer NOT NULL,
	"discount_minor" integer NOT NULL,
	"net_minor" integer NOT NULL,
	"vat_bp" integer NOT NULL,
	"vat_minor" integer NOT NULL,
	"total_minor" integer NOT NULL,
	"status" text DEFAULT 'placed' NOT NULL,
	"version" integer DEFAULT 1 NOT NULL,
	"placed_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"cancelled_at" timestamp with time zone,
	CONSTRAINT "bookings_status_check" CHECK ("bookings"."status" in ('placed','prepaid','cancelled')),
	CONSTRAINT "bookings_amounts_check" CHECK ("bookings"."list_minor" >= 0 and "bookings"."discount_minor" >= 0 and "bookings"."net_minor" = "bookings"."list_minor" - "bookings"."discount_minor" and "bookings"."total_minor" = "bookings"."net_minor" + "bookings"."vat_minor")
);
--> statement-breakpoint
CREATE TABLE "payment_events" (
	"event_id" text PRIMARY KEY NOT NULL,
	"type" text NOT NULL,
	"outcome" text NOT NULL,
	"received_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "booking_payments" ADD CONSTRAINT "booking_payments_booking_id_bookings_id_fk" FOREIGN KEY ("booking_id") REFERENCES "public"."bookings"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "booking_rounds" ADD CONSTRAINT "booking_rounds_season_id_seasons_id_fk" FOREIGN KEY ("season_id") REFERENCES "public"."seasons"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "booking_rounds" ADD CONSTRAINT "booking_rounds_budget_id_budgets_id_fk" FOREIGN KEY ("budget_id") REFERENCES "public"."budgets"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "booking_rounds" ADD CONSTRAINT "booking_rounds_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bookings" ADD CONSTRAINT "bookings_round_id_booking_rounds_id_fk" FOREIGN KEY ("round_id") REFERENCES "public"."booking_rounds"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bookings" ADD CONSTRAINT "bookings_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bookings" ADD CONSTRAINT "bookings_season_id_seasons_id_fk" FOREIGN KEY ("season_id") REFERENCES "public"."seasons"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bookings" ADD CONSTRAINT "bookings_budget_id_budgets_id_fk" FOREIGN KEY ("budget_id") REFERENCES "public"."budgets"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bookings" ADD CONSTRAINT "bookings_placed_by_users_id_fk" FOREIGN KEY ("placed_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "booking_payments_booking_idx" ON "booking_payments" USING btree ("booking_id");--> statement-breakpoint
CREATE INDEX "booking_payments_state_idx" ON "booking_payments" USING btree ("state");--> statement-breakpoint
CREATE UNIQUE INDEX "bookings_one_active_per_farm" ON "bookings" USING btree ("round_id","farm_id") WHERE "bookings"."status" <> 'cancelled';--> statement-breakpoint
CREATE INDEX "bookings_farm_idx" ON "bookings" USING btree ("farm_id");
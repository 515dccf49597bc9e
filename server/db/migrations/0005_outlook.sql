CREATE TABLE "futures_quotes" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "futures_quotes_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"item_id" integer NOT NULL,
	"season_id" integer NOT NULL,
	"contract" text NOT NULL,
	"quote" double precision NOT NULL,
	"currency" text NOT NULL,
	"quoted_on" date NOT NULL,
	"source" text NOT NULL,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "mail_outbox" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "mail_outbox_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"idempotency_key" text NOT NULL,
	"message_id" text NOT NULL,
	"kind" text NOT NULL,
	"outlook_version_id" integer,
	"user_id" integer,
	"to_address" text NOT NULL,
	"subject" text NOT NULL,
	"text_body" text NOT NULL,
	"html_body" text,
	"headers" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"status" text DEFAULT 'queued' NOT NULL,
	"attempts" integer DEFAULT 0 NOT NULL,
	"next_attempt_at" timestamp with time zone DEFAULT now() NOT NULL,
	"locked_by" text,
	"locked_until" timestamp with time zone,
	"last_error" text,
	"smtp_response" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"sent_at" timestamp with time zone,
	CONSTRAINT "mail_outbox_idempotency_key_unique" UNIQUE("idempotency_key"),
	CONSTRAINT "mail_outbox_message_id_unique" UNIQUE("message_id"),
	CONSTRAINT "mail_outbox_status_check" CHECK ("mail_outbox"."status" in ('queued','sending','sent','failed','skipped'))
);
--> statement-breakpoint
CREATE TABLE "outlook_version_farms" (
	"version_id" integer NOT NULL,
	"farm_id" integer NOT NULL,
	"data" jsonb NOT NULL,
	CONSTRAINT "outlook_version_farms_version_id_farm_id_pk" PRIMARY KEY("version_id","farm_id")
);
--> statement-breakpoint
CREATE TABLE "outlook_versions" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "outlook_versions_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"outlook_id" integer NOT NULL,
	"version" integer NOT NULL,
	"season_id" integer NOT NULL,
	"model_run_id" integer NOT NULL,
	"snapshot" jsonb NOT NULL,
	"inputs_hash" text NOT NULL,
	"published_by" integer,
	"published_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "outlooks" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "outlooks_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"season_id" integer NOT NULL,
	"title" text NOT NULL,
	"model_run_id" integer,
	"expectation_settings" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"expectations" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"scenario_rule" text DEFAULT 'margin' NOT NULL,
	"draws" integer DEFAULT 2000 NOT NULL,
	"seed" integer DEFAULT 1 NOT NULL,
	"commentary" text DEFAULT '' NOT NULL,
	"projection_status" text DEFAULT 'none' NOT NULL,
	"projection_progress" double precision DEFAULT 0 NOT NULL,
	"projection_stage" text,
	"projection_error" text,
	"projection_inputs_hash" text,
	"projection" jsonb,
	"projected_at" timestamp with time zone,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "outlooks_season_id_unique" UNIQUE("season_id"),
	CONSTRAINT "outlooks_scenario_rule_check" CHECK ("outlooks"."scenario_rule" in ('margin','uniform')),
	CONSTRAINT "outlooks_projection_status_check" CHECK ("outlooks"."projection_status" in ('none','queued','running','succeeded','failed'))
);
--> statement-breakpoint
ALTER TABLE "futures_quotes" ADD CONSTRAINT "futures_quotes_item_id_items_id_fk" FOREIGN KEY ("item_id") REFERENCES "public"."items"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "futures_quotes" ADD CONSTRAINT "futures_quotes_season_id_seasons_id_fk" FOREIGN KEY ("season_id") REFERENCES "public"."seasons"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "futures_quotes" ADD CONSTRAINT "futures_quotes_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "mail_outbox" ADD CONSTRAINT "mail_outbox_outlook_version_id_outlook_versions_id_fk" FOREIGN KEY ("outlook_version_id") REFERENCES "public"."outlook_versions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "mail_outbox" ADD CONSTRAINT "mail_outbox_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "outlook_version_farms" ADD CONSTRAINT "outlook_version_farms_version_id_outlook_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."outlook_versions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "outlook_version_farms" ADD CONSTRAINT "outlook_version_farms_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "outlook_versions" ADD CONSTRAINT "outlook_versions_outlook_id_outlooks_id_fk" FOREIGN KEY ("outlook_id") REFERENCES "public"."outlooks"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "outlook_versions" ADD CONSTRAINT "outlook_versions_season_id_seasons_id_fk" FOREIGN KEY ("season_id") REFERENCES "public"."seasons"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "outlook_versions" ADD CONSTRAINT "outlook_versions_model_run_id_model_runs_id_fk" FOREIGN KEY ("model_run_id") REFERENCES "public"."model_runs"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "outlook_versions" ADD CONSTRAINT "outlook_versions_published_by_users_id_fk" FOREIGN KEY ("published_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "outlooks" ADD CONSTRAINT "outlooks_season_id_seasons_id_fk" FOREIGN KEY ("season_id") REFERENCES "public"."seasons"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "outlooks" ADD CONSTRAINT "outlooks_model_run_id_model_runs_id_fk" FOREIGN KEY ("model_run_id") REFERENCES "public"."model_runs"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "outlooks" ADD CONSTRAINT "outlooks_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "futures_quotes_unique" ON "futures_quotes" USING btree ("item_id","season_id","contract","quoted_on");--> statement-breakpoint
CREATE INDEX "futures_quotes_season_idx" ON "futures_quotes" USING btree ("season_id");--> statement-breakpoint
CREATE INDEX "mail_outbox_due_idx" ON "mail_outbox" USING btree ("status","next_attempt_at");--> statement-breakpoint
CREATE INDEX "mail_outbox_version_idx" ON "mail_outbox" USING btree ("outlook_version_id");--> statement-breakpoint
CREATE UNIQUE INDEX "outlook_versions_unique" ON "outlook_versions" USING btree ("outlook_id","version");--> statement-breakpoint
CREATE INDEX "outlook_versions_season_idx" ON "outlook_versions" USING btree ("season_id");
CREATE TABLE "imports" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "imports_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"kind" text NOT NULL,
	"file_name" text NOT NULL,
	"file_size" integer NOT NULL,
	"format" text NOT NULL,
	"content" "bytea" NOT NULL,
	"mapping" jsonb NOT NULL,
	"delivery_point" text,
	"status" text NOT NULL,
	"result" jsonb NOT NULL,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"committed_at" timestamp with time zone,
	CONSTRAINT "imports_kind_check" CHECK ("imports"."kind" in ('prices','records','observations')),
	CONSTRAINT "imports_status_check" CHECK ("imports"."status" in ('validated','committing','committed','failed'))
);
--> statement-breakpoint
ALTER TABLE "imports" ADD CONSTRAINT "imports_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "imports_created_idx" ON "imports" USING btree ("created_at");
CREATE TABLE "idempotency_records" (
	"account_id" integer NOT NULL,
	"key" text NOT NULL,
	"fingerprint" text NOT NULL,
	"claim" text NOT NULL,
	"created_at" timestamp with time zone NOT NULL,
	"lease_until" timestamp with time zone NOT NULL,
	"status" integer,
	"content_type" text,
	"body" text,
	CONSTRAINT "idempotency_records_account_id_key_pk" PRIMARY KEY("account_id","key")
);
--> statement-breakpoint
ALTER TABLE "request_log" ADD COLUMN "idempotent_replay" boolean DEFAULT false NOT NULL;--> statement-breakpoint
ALTER TABLE "idempotency_records" ADD CONSTRAINT "idempotency_records_account_id_accounts_id_fk" FOREIGN KEY ("account_id") REFERENCES "public"."accounts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "idempotency_records_created_idx" ON "idempotency_records" USING btree ("created_at");
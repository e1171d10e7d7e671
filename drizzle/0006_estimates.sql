CREATE TYPE "public"."deposit_status" AS ENUM('awaiting_payment', 'paid', 'refunded');--> statement-breakpoint
CREATE TYPE "public"."email_status" AS ENUM('queued', 'sent', 'failed');--> statement-breakpoint
CREATE TYPE "public"."item_decision" AS ENUM('approved', 'declined', 'pending');--> statement-breakpoint
CREATE TABLE "deposit_payments" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"workshop_id" uuid NOT NULL,
	"confirmation_id" uuid NOT NULL,
	"amount_minor" integer NOT NULL,
	"currency" text NOT NULL,
	"status" "deposit_status" DEFAULT 'awaiting_payment' NOT NULL,
	"checkout_session_id" text,
	"payment_intent_id" text,
	"paid_at" timestamp with time zone,
	"refund_id" text,
	"refunded_minor" integer,
	"refunded_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "deposit_payments_amount_positive" CHECK ("deposit_payments"."amount_minor" > 0)
);
--> statement-breakpoint
CREATE TABLE "estimate_confirmations" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"workshop_id" uuid NOT NULL,
	"version_id" uuid NOT NULL,
	"customer_id" uuid NOT NULL,
	"version_hash" text NOT NULL,
	"decisions" jsonb NOT NULL,
	"consents" jsonb NOT NULL,
	"result" jsonb NOT NULL,
	"approved_gross" integer NOT NULL,
	"deposit_minor" integer NOT NULL,
	"ip" "inet",
	"user_agent" text,
	"confirmed_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "estimate_confirmations_workshop_id_id" UNIQUE("workshop_id","id")
);
--> statement-breakpoint
CREATE TABLE "estimate_counters" (
	"workshop_id" uuid PRIMARY KEY NOT NULL,
	"last_number" integer DEFAULT 0 NOT NULL
);
--> statement-breakpoint
CREATE TABLE "estimate_decisions" (
	"workshop_id" uuid NOT NULL,
	"version_id" uuid NOT NULL,
	"item_id" text NOT NULL,
	"decision" "item_decision" NOT NULL,
	"decided_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "estimate_decisions_version_id_item_id_pk" PRIMARY KEY("version_id","item_id")
);
--> statement-breakpoint
CREATE TABLE "estimate_links" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"workshop_id" uuid NOT NULL,
	"version_id" uuid NOT NULL,
	"customer_id" uuid NOT NULL,
	"token_hash" text NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"revoked_at" timestamp with time zone,
	"last_used_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "estimate_questions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"workshop_id" uuid NOT NULL,
	"estimate_id" uuid NOT NULL,
	"version_id" uuid NOT NULL,
	"item_id" text NOT NULL,
	"customer_id" uuid NOT NULL,
	"question" text NOT NULL,
	"answer" text,
	"answered_by" uuid,
	"asked_at" timestamp with time zone DEFAULT now() NOT NULL,
	"answered_at" timestamp with time zone,
	CONSTRAINT "estimate_questions_question_present" CHECK (length(trim("estimate_questions"."question")) > 0)
);
--> statement-breakpoint
CREATE TABLE "estimate_versions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"workshop_id" uuid NOT NULL,
	"estimate_id" uuid NOT NULL,
	"version" integer NOT NULL,
	"snapshot" jsonb NOT NULL,
	"hash" text NOT NULL,
	"proposed_gross" integer NOT NULL,
	"expires_on" date NOT NULL,
	"sent_at" timestamp with time zone DEFAULT now() NOT NULL,
	"sent_by" uuid,
	"superseded_at" timestamp with time zone,
	"opened_at" timestamp with time zone,
	"confirmed_at" timestamp with time zone,
	CONSTRAINT "estimate_versions_workshop_id_id" UNIQUE("workshop_id","id"),
	CONSTRAINT "estimate_versions_estimate_version" UNIQUE("estimate_id","version"),
	CONSTRAINT "estimate_versions_hash_hex" CHECK ("estimate_versions"."hash" ~ '^[0-9a-f]{64}$')
);
--> statement-breakpoint
CREATE TABLE "estimates" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"workshop_id" uuid NOT NULL,
	"job_id" uuid NOT NULL,
	"number" integer NOT NULL,
	"draft" jsonb NOT NULL,
	"revision" integer DEFAULT 0 NOT NULL,
	"sent_revision" integer,
	"withdrawn_at" timestamp with time zone,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "estimates_workshop_id_id" UNIQUE("workshop_id","id"),
	CONSTRAINT "estimates_workshop_number" UNIQUE("workshop_id","number"),
	CONSTRAINT "estimates_number_positive" CHECK ("estimates"."number" > 0)
);
--> statement-breakpoint
CREATE TABLE "outbound_emails" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"workshop_id" uuid NOT NULL,
	"estimate_id" uuid,
	"kind" text NOT NULL,
	"to" text NOT NULL,
	"subject" text NOT NULL,
	"message" jsonb NOT NULL,
	"status" "email_status" DEFAULT 'queued' NOT NULL,
	"attempts" integer DEFAULT 0 NOT NULL,
	"last_error" text,
	"queued_at" timestamp with time zone DEFAULT now() NOT NULL,
	"sent_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "payment_events" (
	"event_id" text PRIMARY KEY NOT NULL,
	"type" text NOT NULL,
	"received_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "workshops" ADD COLUMN "estimate_defaults" jsonb DEFAULT '{"taxMode":"exclusive","taxRounding":"per-line","discount":null,"deposit":{"kind":"none"},"expiryDays":14}'::jsonb NOT NULL;--> statement-breakpoint
ALTER TABLE "deposit_payments" ADD CONSTRAINT "deposit_payments_workshop_id_confirmation_id_estimate_confirmations_workshop_id_id_fk" FOREIGN KEY ("workshop_id","confirmation_id") REFERENCES "public"."estimate_confirmations"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "estimate_confirmations" ADD CONSTRAINT "estimate_confirmations_workshop_id_version_id_estimate_versions_workshop_id_id_fk" FOREIGN KEY ("workshop_id","version_id") REFERENCES "public"."estimate_versions"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "estimate_confirmations" ADD CONSTRAINT "estimate_confirmations_workshop_id_customer_id_customers_workshop_id_id_fk" FOREIGN KEY ("workshop_id","customer_id") REFERENCES "public"."customers"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "estimate_counters" ADD CONSTRAINT "estimate_counters_workshop_id_workshops_id_fk" FOREIGN KEY ("workshop_id") REFERENCES "public"."workshops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "estimate_decisions" ADD CONSTRAINT "estimate_decisions_workshop_id_version_id_estimate_versions_workshop_id_id_fk" FOREIGN KEY ("workshop_id","version_id") REFERENCES "public"."estimate_versions"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "estimate_links" ADD CONSTRAINT "estimate_links_workshop_id_version_id_estimate_versions_workshop_id_id_fk" FOREIGN KEY ("workshop_id","version_id") REFERENCES "public"."estimate_versions"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "estimate_links" ADD CONSTRAINT "estimate_links_workshop_id_customer_id_customers_workshop_id_id_fk" FOREIGN KEY ("workshop_id","customer_id") REFERENCES "public"."customers"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "estimate_questions" ADD CONSTRAINT "estimate_questions_workshop_id_estimate_id_estimates_workshop_id_id_fk" FOREIGN KEY ("workshop_id","estimate_id") REFERENCES "public"."estimates"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "estimate_questions" ADD CONSTRAINT "estimate_questions_workshop_id_version_id_estimate_versions_workshop_id_id_fk" FOREIGN KEY ("workshop_id","version_id") REFERENCES "public"."estimate_versions"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "estimate_questions" ADD CONSTRAINT "estimate_questions_workshop_id_answered_by_staff_users_workshop_id_id_fk" FOREIGN KEY ("workshop_id","answered_by") REFERENCES "public"."staff_users"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "estimate_versions" ADD CONSTRAINT "estimate_versions_workshop_id_estimate_id_estimates_workshop_id_id_fk" FOREIGN KEY ("workshop_id","estimate_id") REFERENCES "public"."estimates"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "estimates" ADD CONSTRAINT "estimates_workshop_id_workshops_id_fk" FOREIGN KEY ("workshop_id") REFERENCES "public"."workshops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "estimates" ADD CONSTRAINT "estimates_workshop_id_job_id_jobs_workshop_id_id_fk" FOREIGN KEY ("workshop_id","job_id") REFERENCES "public"."jobs"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "estimates" ADD CONSTRAINT "estimates_workshop_id_created_by_staff_users_workshop_id_id_fk" FOREIGN KEY ("workshop_id","created_by") REFERENCES "public"."staff_users"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "outbound_emails" ADD CONSTRAINT "outbound_emails_workshop_id_workshops_id_fk" FOREIGN KEY ("workshop_id") REFERENCES "public"."workshops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "outbound_emails" ADD CONSTRAINT "outbound_emails_workshop_id_estimate_id_estimates_workshop_id_id_fk" FOREIGN KEY ("workshop_id","estimate_id") REFERENCES "public"."estimates"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "deposit_payments_one_per_confirmation" ON "deposit_payments" USING btree ("confirmation_id");--> statement-breakpoint
CREATE UNIQUE INDEX "deposit_payments_checkout_session" ON "deposit_payments" USING btree ("checkout_session_id");--> statement-breakpoint
CREATE UNIQUE INDEX "estimate_confirmations_one_per_version" ON "estimate_confirmations" USING btree ("version_id");--> statement-breakpoint
CREATE UNIQUE INDEX "estimate_links_token_hash" ON "estimate_links" USING btree ("token_hash");--> statement-breakpoint
CREATE INDEX "estimate_questions_estimate" ON "estimate_questions" USING btree ("workshop_id","estimate_id");--> statement-breakpoint
CREATE INDEX "estimates_job" ON "estimates" USING btree ("workshop_id","job_id");--> statement-breakpoint
CREATE INDEX "outbound_emails_estimate" ON "outbound_emails" USING btree ("workshop_id","estimate_id");
CREATE TYPE "public"."principal_kind" AS ENUM('staff', 'customer');--> statement-breakpoint
CREATE TYPE "public"."actor_kind" AS ENUM('staff', 'customer', 'anonymous', 'system');--> statement-breakpoint
CREATE TABLE "rate_limits" (
	"key" text PRIMARY KEY NOT NULL,
	"hits" integer NOT NULL,
	"resets_at" timestamp with time zone NOT NULL
);
--> statement-breakpoint
CREATE TABLE "sessions" (
	"sid" varchar PRIMARY KEY NOT NULL,
	"sess" json NOT NULL,
	"expire" timestamp (6) NOT NULL
);
--> statement-breakpoint
CREATE TABLE "sign_in_tokens" (
	"token_hash" text PRIMARY KEY NOT NULL,
	"principal_kind" "principal_kind" NOT NULL,
	"staff_user_id" uuid,
	"customer_id" uuid,
	"workshop_id" uuid NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"used_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "sign_in_tokens_hash_shape" CHECK ("sign_in_tokens"."token_hash" ~ '^[0-9a-f]{64}$'),
	CONSTRAINT "sign_in_tokens_one_principal" CHECK (("sign_in_tokens"."principal_kind" = 'staff' and "sign_in_tokens"."staff_user_id" is not null and "sign_in_tokens"."customer_id" is null) or ("sign_in_tokens"."principal_kind" = 'customer' and "sign_in_tokens"."customer_id" is not null and "sign_in_tokens"."staff_user_id" is null))
);
--> statement-breakpoint
CREATE TABLE "audit_events" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"workshop_id" uuid,
	"actor_kind" "actor_kind" NOT NULL,
	"actor_id" uuid,
	"actor_name" text,
	"action" text NOT NULL,
	"subject_type" text,
	"subject_id" text,
	"details" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"ip" text,
	"user_agent" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "sign_in_tokens" ADD CONSTRAINT "sign_in_tokens_staff_user_id_staff_users_id_fk" FOREIGN KEY ("staff_user_id") REFERENCES "public"."staff_users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sign_in_tokens" ADD CONSTRAINT "sign_in_tokens_customer_id_customers_id_fk" FOREIGN KEY ("customer_id") REFERENCES "public"."customers"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sign_in_tokens" ADD CONSTRAINT "sign_in_tokens_workshop_id_workshops_id_fk" FOREIGN KEY ("workshop_id") REFERENCES "public"."workshops"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "audit_events" ADD CONSTRAINT "audit_events_workshop_id_workshops_id_fk" FOREIGN KEY ("workshop_id") REFERENCES "public"."workshops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "sessions_expire" ON "sessions" USING btree ("expire");--> statement-breakpoint
CREATE INDEX "sign_in_tokens_expires" ON "sign_in_tokens" USING btree ("expires_at");--> statement-breakpoint
CREATE INDEX "audit_events_workshop_time" ON "audit_events" USING btree ("workshop_id","created_at");--> statement-breakpoint
CREATE INDEX "audit_events_workshop_action" ON "audit_events" USING btree ("workshop_id","action");
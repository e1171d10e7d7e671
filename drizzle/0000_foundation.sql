CREATE TYPE "public"."staff_role" AS ENUM('owner', 'advisor', 'technician');--> statement-breakpoint
CREATE TYPE "public"."odometer_unit" AS ENUM('mi', 'km');--> statement-breakpoint
CREATE TYPE "public"."job_status" AS ENUM('booked_in', 'inspecting', 'quoting', 'waiting_for_customer', 'in_work', 'finished', 'cancelled');--> statement-breakpoint
CREATE TABLE "workshops" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"name" text NOT NULL,
	"address_lines" text[] DEFAULT '{}'::text[] NOT NULL,
	"postcode" text,
	"phone" text,
	"email" text,
	"vat_number" text,
	"currency" text DEFAULT 'GBP' NOT NULL,
	"timezone" text DEFAULT 'Europe/London' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "workshops_name_present" CHECK (length(trim("workshops"."name")) > 0),
	CONSTRAINT "workshops_currency_iso" CHECK ("workshops"."currency" ~ '^[A-Z]{3}$')
);
--> statement-breakpoint
CREATE TABLE "staff_users" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"workshop_id" uuid NOT NULL,
	"email" text NOT NULL,
	"name" text NOT NULL,
	"role" "staff_role" NOT NULL,
	"deactivated_at" timestamp with time zone,
	"last_sign_in_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "staff_users_workshop_id_id" UNIQUE("workshop_id","id"),
	CONSTRAINT "staff_users_email_shape" CHECK ("staff_users"."email" ~ '^[^@\s]+@[^@\s]+$'),
	CONSTRAINT "staff_users_name_present" CHECK (length(trim("staff_users"."name")) > 0)
);
--> statement-breakpoint
CREATE TABLE "customers" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"workshop_id" uuid NOT NULL,
	"name" text NOT NULL,
	"email" text,
	"phone" text,
	"address_lines" text[] DEFAULT '{}'::text[] NOT NULL,
	"postcode" text,
	"contact_by_email" boolean DEFAULT true NOT NULL,
	"contact_by_phone" boolean DEFAULT false NOT NULL,
	"contact_by_sms" boolean DEFAULT false NOT NULL,
	"archived_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "customers_workshop_id_id" UNIQUE("workshop_id","id"),
	CONSTRAINT "customers_name_present" CHECK (length(trim("customers"."name")) > 0),
	CONSTRAINT "customers_email_shape" CHECK ("customers"."email" is null or "customers"."email" ~ '^[^@\s]+@[^@\s]+$'),
	CONSTRAINT "customers_reachable" CHECK ("customers"."email" is not null or "customers"."phone" is not null)
);
--> statement-breakpoint
CREATE TABLE "vehicles" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"workshop_id" uuid NOT NULL,
	"customer_id" uuid NOT NULL,
	"registration" text NOT NULL,
	"vin" text,
	"make" text NOT NULL,
	"model" text NOT NULL,
	"year" integer,
	"odometer" integer,
	"odometer_unit" "odometer_unit" DEFAULT 'mi' NOT NULL,
	"vehicle_group" text,
	"archived_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "vehicles_workshop_id_id" UNIQUE("workshop_id","id"),
	CONSTRAINT "vehicles_registration_present" CHECK (length(trim("vehicles"."registration")) > 0),
	CONSTRAINT "vehicles_vin_iso3779" CHECK ("vehicles"."vin" is null or "vehicles"."vin" ~ '^[A-HJ-NPR-Z0-9]{17}$'),
	CONSTRAINT "vehicles_year_range" CHECK ("vehicles"."year" is null or "vehicles"."year" between 1886 and 2100),
	CONSTRAINT "vehicles_odometer_positive" CHECK ("vehicles"."odometer" is null or "vehicles"."odometer" >= 0)
);
--> statement-breakpoint
CREATE TABLE "jobs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"workshop_id" uuid NOT NULL,
	"vehicle_id" uuid NOT NULL,
	"concern" text NOT NULL,
	"status" "job_status" DEFAULT 'booked_in' NOT NULL,
	"technician_id" uuid,
	"booked_for" date,
	"promised_for" date,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "jobs_concern_present" CHECK (length(trim("jobs"."concern")) > 0),
	CONSTRAINT "jobs_promised_after_booked" CHECK ("jobs"."promised_for" is null or "jobs"."booked_for" is null or "jobs"."promised_for" >= "jobs"."booked_for")
);
--> statement-breakpoint
ALTER TABLE "staff_users" ADD CONSTRAINT "staff_users_workshop_id_workshops_id_fk" FOREIGN KEY ("workshop_id") REFERENCES "public"."workshops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "customers" ADD CONSTRAINT "customers_workshop_id_workshops_id_fk" FOREIGN KEY ("workshop_id") REFERENCES "public"."workshops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "vehicles" ADD CONSTRAINT "vehicles_workshop_id_workshops_id_fk" FOREIGN KEY ("workshop_id") REFERENCES "public"."workshops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "vehicles" ADD CONSTRAINT "vehicles_workshop_id_customer_id_customers_workshop_id_id_fk" FOREIGN KEY ("workshop_id","customer_id") REFERENCES "public"."customers"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "jobs" ADD CONSTRAINT "jobs_workshop_id_workshops_id_fk" FOREIGN KEY ("workshop_id") REFERENCES "public"."workshops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "jobs" ADD CONSTRAINT "jobs_workshop_id_vehicle_id_vehicles_workshop_id_id_fk" FOREIGN KEY ("workshop_id","vehicle_id") REFERENCES "public"."vehicles"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "jobs" ADD CONSTRAINT "jobs_workshop_id_technician_id_staff_users_workshop_id_id_fk" FOREIGN KEY ("workshop_id","technician_id") REFERENCES "public"."staff_users"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "staff_users_email_unique" ON "staff_users" USING btree (lower("email"));--> statement-breakpoint
CREATE INDEX "customers_workshop_name" ON "customers" USING btree ("workshop_id","name");--> statement-breakpoint
CREATE INDEX "vehicles_workshop_registration" ON "vehicles" USING btree ("workshop_id","registration");--> statement-breakpoint
CREATE INDEX "jobs_workshop_status" ON "jobs" USING btree ("workshop_id","status");
ALTER TABLE "jobs" ADD CONSTRAINT "jobs_workshop_id_id" UNIQUE("workshop_id","id");--> statement-breakpoint
CREATE TYPE "public"."catalogue_word_source" AS ENUM('labour', 'parts');--> statement-breakpoint
CREATE TYPE "public"."labour_category" AS ENUM('standard', 'diagnostic', 'specialist');--> statement-breakpoint
CREATE TYPE "public"."labour_side" AS ENUM('left', 'right', 'both', 'none');--> statement-breakpoint
CREATE TYPE "public"."labour_system" AS ENUM('front_axle', 'rear_axle', 'prop_shafts', 'transfer_box', 'steering', 'hubs_bearings');--> statement-breakpoint
CREATE TYPE "public"."inspection_status" AS ENUM('safety', 'in_progress', 'finished');--> statement-breakpoint
CREATE TYPE "public"."position" AS ENUM('left', 'right', 'front', 'rear', 'none');--> statement-breakpoint
CREATE TYPE "public"."severity" AS ENUM('urgent', 'soon', 'watch', 'ok');--> statement-breakpoint
CREATE TABLE "access_step_includes" (
	"workshop_id" uuid NOT NULL,
	"step_id" uuid NOT NULL,
	"included_step_id" uuid NOT NULL,
	CONSTRAINT "access_step_includes_step_id_included_step_id_pk" PRIMARY KEY("step_id","included_step_id"),
	CONSTRAINT "access_step_includes_not_itself" CHECK ("access_step_includes"."step_id" <> "access_step_includes"."included_step_id")
);
--> statement-breakpoint
CREATE TABLE "access_steps" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"workshop_id" uuid NOT NULL,
	"code" text NOT NULL,
	"name" text NOT NULL,
	"hours" numeric(6, 2) NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "access_steps_workshop_id_id" UNIQUE("workshop_id","id"),
	CONSTRAINT "access_steps_workshop_code" UNIQUE("workshop_id","code"),
	CONSTRAINT "access_steps_code_present" CHECK (length(trim("access_steps"."code")) > 0),
	CONSTRAINT "access_steps_name_present" CHECK (length(trim("access_steps"."name")) > 0),
	CONSTRAINT "access_steps_hours_range" CHECK ("access_steps"."hours" >= 0)
);
--> statement-breakpoint
CREATE TABLE "catalogue_words" (
	"workshop_id" uuid NOT NULL,
	"source" "catalogue_word_source" NOT NULL,
	"word" text NOT NULL,
	CONSTRAINT "catalogue_words_workshop_id_source_word_pk" PRIMARY KEY("workshop_id","source","word")
);
--> statement-breakpoint
CREATE TABLE "labour_clock_times" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"workshop_id" uuid NOT NULL,
	"operation_id" uuid NOT NULL,
	"job_id" uuid,
	"technician_id" uuid NOT NULL,
	"hours" numeric(6, 2) NOT NULL,
	"recorded_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "labour_clock_times_hours_positive" CHECK ("labour_clock_times"."hours" > 0)
);
--> statement-breakpoint
CREATE TABLE "labour_operation_access_steps" (
	"workshop_id" uuid NOT NULL,
	"operation_id" uuid NOT NULL,
	"access_step_id" uuid NOT NULL,
	"position" integer NOT NULL,
	CONSTRAINT "labour_operation_access_steps_operation_id_access_step_id_pk" PRIMARY KEY("operation_id","access_step_id")
);
--> statement-breakpoint
CREATE TABLE "labour_operations" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"workshop_id" uuid NOT NULL,
	"code" text NOT NULL,
	"name" text NOT NULL,
	"synonyms" text[] DEFAULT '{}'::text[] NOT NULL,
	"system" "labour_system" NOT NULL,
	"vehicle_groups" text[] DEFAULT '{}'::text[] NOT NULL,
	"side" "labour_side" NOT NULL,
	"book_hours" numeric(6, 2) NOT NULL,
	"category" "labour_category" NOT NULL,
	"notes" text,
	"archived_at" timestamp with time zone,
	"search_text" text DEFAULT '' NOT NULL,
	"search_vector" "tsvector" DEFAULT ''::tsvector NOT NULL,
	"lookup_key" text DEFAULT '' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "labour_operations_workshop_id_id" UNIQUE("workshop_id","id"),
	CONSTRAINT "labour_operations_workshop_code" UNIQUE("workshop_id","code"),
	CONSTRAINT "labour_operations_code_present" CHECK (length(trim("labour_operations"."code")) > 0),
	CONSTRAINT "labour_operations_name_present" CHECK (length(trim("labour_operations"."name")) > 0),
	CONSTRAINT "labour_operations_hours_positive" CHECK ("labour_operations"."book_hours" > 0)
);
--> statement-breakpoint
CREATE TABLE "markup_bands" (
	"workshop_id" uuid NOT NULL,
	"from_cost_minor" integer NOT NULL,
	"markup_percent" numeric(7, 2) NOT NULL,
	CONSTRAINT "markup_bands_workshop_id_from_cost_minor_pk" PRIMARY KEY("workshop_id","from_cost_minor"),
	CONSTRAINT "markup_bands_from_range" CHECK ("markup_bands"."from_cost_minor" >= 0),
	CONSTRAINT "markup_bands_percent_range" CHECK ("markup_bands"."markup_percent" >= 0)
);
--> statement-breakpoint
CREATE TABLE "parts" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"workshop_id" uuid NOT NULL,
	"part_number" text NOT NULL,
	"description" text NOT NULL,
	"supplier_ref" text,
	"cost_minor" integer NOT NULL,
	"sell_price_minor" integer,
	"tax_rate" numeric(5, 2) NOT NULL,
	"stock_quantity" integer,
	"archived_at" timestamp with time zone,
	"search_text" text DEFAULT '' NOT NULL,
	"search_vector" "tsvector" DEFAULT ''::tsvector NOT NULL,
	"lookup_key" text DEFAULT '' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "parts_workshop_id_id" UNIQUE("workshop_id","id"),
	CONSTRAINT "parts_workshop_part_number" UNIQUE("workshop_id","part_number"),
	CONSTRAINT "parts_part_number_present" CHECK (length(trim("parts"."part_number")) > 0),
	CONSTRAINT "parts_description_present" CHECK (length(trim("parts"."description")) > 0),
	CONSTRAINT "parts_cost_range" CHECK ("parts"."cost_minor" >= 0),
	CONSTRAINT "parts_sell_price_range" CHECK ("parts"."sell_price_minor" is null or "parts"."sell_price_minor" >= 0),
	CONSTRAINT "parts_tax_rate_range" CHECK ("parts"."tax_rate" >= 0 and "parts"."tax_rate" <= 100),
	CONSTRAINT "parts_stock_range" CHECK ("parts"."stock_quantity" is null or "parts"."stock_quantity" >= 0)
);
--> statement-breakpoint
CREATE TABLE "workshop_pricing" (
	"workshop_id" uuid PRIMARY KEY NOT NULL,
	"standard_rate_minor" integer,
	"diagnostic_rate_minor" integer,
	"specialist_rate_minor" integer,
	"default_tax_rate" numeric(5, 2) NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "workshop_pricing_rates_range" CHECK (coalesce("workshop_pricing"."standard_rate_minor", 0) >= 0 and coalesce("workshop_pricing"."diagnostic_rate_minor", 0) >= 0 and coalesce("workshop_pricing"."specialist_rate_minor", 0) >= 0),
	CONSTRAINT "workshop_pricing_tax_range" CHECK ("workshop_pricing"."default_tax_rate" >= 0 and "workshop_pricing"."default_tax_rate" <= 100)
);
--> statement-breakpoint
CREATE TABLE "check_templates" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"workshop_id" uuid NOT NULL,
	"name" text NOT NULL,
	"vehicle_group" text,
	"definition" jsonb NOT NULL,
	"based_on_id" uuid,
	"archived_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "check_templates_workshop_id_id" UNIQUE("workshop_id","id"),
	CONSTRAINT "check_templates_name_present" CHECK (length(trim("check_templates"."name")) > 0)
);
--> statement-breakpoint
CREATE TABLE "findings" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"workshop_id" uuid NOT NULL,
	"job_id" uuid NOT NULL,
	"inspection_id" uuid,
	"result_id" uuid,
	"check_code" text,
	"position" "position" DEFAULT 'none' NOT NULL,
	"title" text NOT NULL,
	"severity" "severity" NOT NULL,
	"explanation" jsonb NOT NULL,
	"measurement" text,
	"suggested_repair" jsonb DEFAULT '{"labour":[],"parts":[]}'::jsonb NOT NULL,
	"reviewed_at" timestamp with time zone,
	"reviewed_by" uuid,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "findings_workshop_id_id" UNIQUE("workshop_id","id"),
	CONSTRAINT "findings_title_present" CHECK (length(trim("findings"."title")) > 0)
);
--> statement-breakpoint
CREATE TABLE "inspection_results" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"workshop_id" uuid NOT NULL,
	"inspection_id" uuid NOT NULL,
	"check_code" text NOT NULL,
	"position" "position" NOT NULL,
	"value" jsonb NOT NULL,
	"suggested_severity" "severity",
	"detail" text NOT NULL,
	"note" text,
	"recorded_by" uuid,
	"recorded_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "inspection_results_workshop_id_id" UNIQUE("workshop_id","id")
);
--> statement-breakpoint
CREATE TABLE "inspections" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"workshop_id" uuid NOT NULL,
	"job_id" uuid NOT NULL,
	"template_id" uuid,
	"template_name" text NOT NULL,
	"definition" jsonb NOT NULL,
	"status" "inspection_status" DEFAULT 'safety' NOT NULL,
	"safety" jsonb,
	"technician_id" uuid,
	"notes" text DEFAULT '' NOT NULL,
	"started_at" timestamp with time zone DEFAULT now() NOT NULL,
	"finished_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "inspections_workshop_id_id" UNIQUE("workshop_id","id"),
	CONSTRAINT "inspections_finished_after_start" CHECK ("inspections"."finished_at" is null or "inspections"."finished_at" >= "inspections"."started_at")
);
--> statement-breakpoint
CREATE TABLE "photos" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"workshop_id" uuid NOT NULL,
	"finding_id" uuid NOT NULL,
	"storage_key" text NOT NULL,
	"thumb_key" text NOT NULL,
	"content_type" text NOT NULL,
	"width" integer NOT NULL,
	"height" integer NOT NULL,
	"bytes" integer NOT NULL,
	"uploaded_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "photos_content_type" CHECK ("photos"."content_type" in ('image/jpeg', 'image/png', 'image/webp'))
);
--> statement-breakpoint
ALTER TABLE "access_step_includes" ADD CONSTRAINT "access_step_includes_workshop_id_step_id_access_steps_workshop_id_id_fk" FOREIGN KEY ("workshop_id","step_id") REFERENCES "public"."access_steps"("workshop_id","id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "access_step_includes" ADD CONSTRAINT "access_step_includes_workshop_id_included_step_id_access_steps_workshop_id_id_fk" FOREIGN KEY ("workshop_id","included_step_id") REFERENCES "public"."access_steps"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "access_steps" ADD CONSTRAINT "access_steps_workshop_id_workshops_id_fk" FOREIGN KEY ("workshop_id") REFERENCES "public"."workshops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "catalogue_words" ADD CONSTRAINT "catalogue_words_workshop_id_workshops_id_fk" FOREIGN KEY ("workshop_id") REFERENCES "public"."workshops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "labour_clock_times" ADD CONSTRAINT "labour_clock_times_workshop_id_workshops_id_fk" FOREIGN KEY ("workshop_id") REFERENCES "public"."workshops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "labour_clock_times" ADD CONSTRAINT "labour_clock_times_job_id_jobs_id_fk" FOREIGN KEY ("job_id") REFERENCES "public"."jobs"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "labour_clock_times" ADD CONSTRAINT "labour_clock_times_workshop_id_operation_id_labour_operations_workshop_id_id_fk" FOREIGN KEY ("workshop_id","operation_id") REFERENCES "public"."labour_operations"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "labour_clock_times" ADD CONSTRAINT "labour_clock_times_workshop_id_technician_id_staff_users_workshop_id_id_fk" FOREIGN KEY ("workshop_id","technician_id") REFERENCES "public"."staff_users"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "labour_operation_access_steps" ADD CONSTRAINT "labour_operation_access_steps_workshop_id_operation_id_labour_operations_workshop_id_id_fk" FOREIGN KEY ("workshop_id","operation_id") REFERENCES "public"."labour_operations"("workshop_id","id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "labour_operation_access_steps" ADD CONSTRAINT "labour_operation_access_steps_workshop_id_access_step_id_access_steps_workshop_id_id_fk" FOREIGN KEY ("workshop_id","access_step_id") REFERENCES "public"."access_steps"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "labour_operations" ADD CONSTRAINT "labour_operations_workshop_id_workshops_id_fk" FOREIGN KEY ("workshop_id") REFERENCES "public"."workshops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "markup_bands" ADD CONSTRAINT "markup_bands_workshop_id_workshops_id_fk" FOREIGN KEY ("workshop_id") REFERENCES "public"."workshops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "parts" ADD CONSTRAINT "parts_workshop_id_workshops_id_fk" FOREIGN KEY ("workshop_id") REFERENCES "public"."workshops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "workshop_pricing" ADD CONSTRAINT "workshop_pricing_workshop_id_workshops_id_fk" FOREIGN KEY ("workshop_id") REFERENCES "public"."workshops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "check_templates" ADD CONSTRAINT "check_templates_workshop_id_workshops_id_fk" FOREIGN KEY ("workshop_id") REFERENCES "public"."workshops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "findings" ADD CONSTRAINT "findings_workshop_id_workshops_id_fk" FOREIGN KEY ("workshop_id") REFERENCES "public"."workshops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "findings" ADD CONSTRAINT "findings_workshop_id_job_id_jobs_workshop_id_id_fk" FOREIGN KEY ("workshop_id","job_id") REFERENCES "public"."jobs"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "findings" ADD CONSTRAINT "findings_workshop_id_inspection_id_inspections_workshop_id_id_fk" FOREIGN KEY ("workshop_id","inspection_id") REFERENCES "public"."inspections"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "findings" ADD CONSTRAINT "findings_workshop_id_result_id_inspection_results_workshop_id_id_fk" FOREIGN KEY ("workshop_id","result_id") REFERENCES "public"."inspection_results"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "inspection_results" ADD CONSTRAINT "inspection_results_workshop_id_workshops_id_fk" FOREIGN KEY ("workshop_id") REFERENCES "public"."workshops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "inspection_results" ADD CONSTRAINT "inspection_results_workshop_id_inspection_id_inspections_workshop_id_id_fk" FOREIGN KEY ("workshop_id","inspection_id") REFERENCES "public"."inspections"("workshop_id","id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "inspection_results" ADD CONSTRAINT "inspection_results_workshop_id_recorded_by_staff_users_workshop_id_id_fk" FOREIGN KEY ("workshop_id","recorded_by") REFERENCES "public"."staff_users"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "inspections" ADD CONSTRAINT "inspections_workshop_id_workshops_id_fk" FOREIGN KEY ("workshop_id") REFERENCES "public"."workshops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "inspections" ADD CONSTRAINT "inspections_workshop_id_job_id_jobs_workshop_id_id_fk" FOREIGN KEY ("workshop_id","job_id") REFERENCES "public"."jobs"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "inspections" ADD CONSTRAINT "inspections_workshop_id_template_id_check_templates_workshop_id_id_fk" FOREIGN KEY ("workshop_id","template_id") REFERENCES "public"."check_templates"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "inspections" ADD CONSTRAINT "inspections_workshop_id_technician_id_staff_users_workshop_id_id_fk" FOREIGN KEY ("workshop_id","technician_id") REFERENCES "public"."staff_users"("workshop_id","id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "photos" ADD CONSTRAINT "photos_workshop_id_workshops_id_fk" FOREIGN KEY ("workshop_id") REFERENCES "public"."workshops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "photos" ADD CONSTRAINT "photos_workshop_id_finding_id_findings_workshop_id_id_fk" FOREIGN KEY ("workshop_id","finding_id") REFERENCES "public"."findings"("workshop_id","id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "access_step_includes_included" ON "access_step_includes" USING btree ("workshop_id","included_step_id");--> statement-breakpoint
CREATE INDEX "labour_clock_times_operation" ON "labour_clock_times" USING btree ("workshop_id","operation_id");--> statement-breakpoint
CREATE INDEX "labour_operation_access_steps_step" ON "labour_operation_access_steps" USING btree ("workshop_id","access_step_id");--> statement-breakpoint
CREATE UNIQUE INDEX "findings_one_per_result" ON "findings" USING btree ("result_id");--> statement-breakpoint
CREATE INDEX "findings_job" ON "findings" USING btree ("job_id");--> statement-breakpoint
CREATE UNIQUE INDEX "inspection_results_one_per_check" ON "inspection_results" USING btree ("inspection_id","check_code","position");--> statement-breakpoint
CREATE INDEX "inspections_job" ON "inspections" USING btree ("job_id");--> statement-breakpoint
CREATE INDEX "photos_finding" ON "photos" USING btree ("finding_id");--> statement-breakpoint
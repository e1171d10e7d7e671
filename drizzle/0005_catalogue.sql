ALTER TABLE "labour_clock_times" DROP CONSTRAINT "labour_clock_times_job_id_jobs_id_fk";
--> statement-breakpoint
ALTER TABLE "labour_clock_times" ADD CONSTRAINT "labour_clock_times_workshop_id_job_id_jobs_workshop_id_id_fk" FOREIGN KEY ("workshop_id","job_id") REFERENCES "public"."jobs"("workshop_id","id") ON DELETE restrict ON UPDATE no action;
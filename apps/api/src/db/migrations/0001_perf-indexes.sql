CREATE TABLE "service_call_facts" (
	"job_id" uuid PRIMARY KEY NOT NULL,
	"branch_id" uuid NOT NULL,
	"unit_id" uuid,
	"opened_at" timestamp with time zone NOT NULL,
	"first_visit_id" uuid,
	"first_closed_at" timestamp with time zone,
	"first_outcome" text,
	"tech_id" uuid,
	"cause_code" text,
	"origin" text,
	"first_callback_at" timestamp with time zone,
	"first_return_at" timestamp with time zone,
	"return_visits" integer DEFAULT 0 NOT NULL,
	"last_closed_at" timestamp with time zone,
	"last_outcome" text
);
--> statement-breakpoint
ALTER TABLE "service_call_facts" ADD CONSTRAINT "service_call_facts_job_id_work_orders_id_fk" FOREIGN KEY ("job_id") REFERENCES "public"."work_orders"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "service_call_facts_closed_idx" ON "service_call_facts" USING btree ("first_closed_at");--> statement-breakpoint
CREATE INDEX "service_call_facts_branch_closed_idx" ON "service_call_facts" USING btree ("branch_id","first_closed_at");
CREATE TABLE "agreement_units" (
	"agreement_id" uuid NOT NULL,
	"unit_id" uuid NOT NULL,
	CONSTRAINT "agreement_units_agreement_id_unit_id_pk" PRIMARY KEY("agreement_id","unit_id")
);
--> statement-breakpoint
CREATE TABLE "agreements" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"branch_id" uuid NOT NULL,
	"site_id" uuid NOT NULL,
	"name" text NOT NULL,
	"rrule" text NOT NULL,
	"season_notes" text,
	"term_start" date NOT NULL,
	"term_end" date NOT NULL,
	"sla_hours" integer NOT NULL,
	"price_cents" integer NOT NULL,
	"visit_minutes" integer DEFAULT 90 NOT NULL,
	"tasks" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"status" text DEFAULT 'active' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "alarms" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"branch_id" uuid NOT NULL,
	"unit_id" uuid NOT NULL,
	"circuit" integer,
	"code" text NOT NULL,
	"description" text,
	"raised_at" timestamp with time zone NOT NULL,
	"cleared_at" timestamp with time zone,
	"source" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "app_meta" (
	"key" text PRIMARY KEY NOT NULL,
	"value" jsonb NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "attachments" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"visit_id" uuid,
	"unit_id" uuid,
	"kind" text NOT NULL,
	"storage_key" text NOT NULL,
	"thumbnail_key" text,
	"display_name" text NOT NULL,
	"content_type" text NOT NULL,
	"size_bytes" integer NOT NULL,
	"uploaded_by_id" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "audit_events" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"actor_id" uuid,
	"action" text NOT NULL,
	"entity" text NOT NULL,
	"entity_id" uuid,
	"details" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "bookings" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"branch_id" uuid NOT NULL,
	"work_order_id" uuid NOT NULL,
	"tech_id" uuid NOT NULL,
	"start_at" timestamp with time zone NOT NULL,
	"end_at" timestamp with time zone NOT NULL,
	"version" integer DEFAULT 1 NOT NULL,
	"fixed" boolean DEFAULT false NOT NULL,
	"hours_override" boolean DEFAULT false NOT NULL,
	"override_reason" text,
	"override_by_id" uuid,
	"created_by_id" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "branches" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"name" text NOT NULL,
	"code" text NOT NULL,
	"time_zone" text NOT NULL,
	"base_address" text DEFAULT '' NOT NULL,
	"base_lat" double precision NOT NULL,
	"base_lon" double precision NOT NULL,
	"holidays" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"labour_rate_cents" integer DEFAULT 0 NOT NULL,
	"refrigerant_price_cents_per_lb" integer DEFAULT 0 NOT NULL,
	"currency" text DEFAULT 'USD' NOT NULL,
	"unit_system" text DEFAULT 'imperial' NOT NULL,
	"sensor_tolerance_percent" double precision DEFAULT 3 NOT NULL,
	"sensor_tolerance_absolute" double precision DEFAULT 5 NOT NULL,
	"repeat_alarm_count" integer DEFAULT 2 NOT NULL,
	"repeat_alarm_days" integer DEFAULT 30 NOT NULL,
	"callback_window_days" integer DEFAULT 30 NOT NULL,
	"digest_hour" integer DEFAULT 7 NOT NULL,
	"archived_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "circuits" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"unit_id" uuid NOT NULL,
	"number" integer NOT NULL,
	"compressor_count" integer DEFAULT 1 NOT NULL,
	"charge_lb" double precision
);
--> statement-breakpoint
CREATE TABLE "customers" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"branch_id" uuid NOT NULL,
	"name" text NOT NULL,
	"contact_name" text,
	"contact_email" text,
	"contact_phone" text,
	"billing_address" text,
	"notes" text,
	"archived_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "findings" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"visit_id" uuid NOT NULL,
	"unit_id" uuid,
	"cause_code" text NOT NULL,
	"origin" text NOT NULL,
	"alarm_code" text,
	"reported_circuit" integer,
	"actual_circuit" integer,
	"notes" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "invitations" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"email" text NOT NULL,
	"name" text NOT NULL,
	"role" text NOT NULL,
	"branch_id" uuid,
	"profile" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"token_hash" text NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"used_at" timestamp with time zone,
	"revoked_at" timestamp with time zone,
	"invited_by_id" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "job_runs" (
	"run_key" text PRIMARY KEY NOT NULL,
	"job" text NOT NULL,
	"started_at" timestamp with time zone DEFAULT now() NOT NULL,
	"finished_at" timestamp with time zone,
	"result" jsonb
);
--> statement-breakpoint
CREATE TABLE "leak_cases" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"branch_id" uuid NOT NULL,
	"unit_id" uuid NOT NULL,
	"triggering_event_id" uuid,
	"opened_on" date NOT NULL,
	"rule" text NOT NULL,
	"method" text NOT NULL,
	"threshold_percent" double precision NOT NULL,
	"leak_rate_percent" double precision NOT NULL,
	"repair_due_date" date NOT NULL,
	"chronic" boolean DEFAULT false NOT NULL,
	"status" text DEFAULT 'open' NOT NULL,
	"plan_kind" text,
	"plan_due_date" date,
	"repair_work_order_id" uuid,
	"repaired_on" date,
	"closed_at" timestamp with time zone,
	"notes" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "mail_outbox" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"message_id" text,
	"from" text NOT NULL,
	"to" text NOT NULL,
	"subject" text NOT NULL,
	"text" text,
	"html" text,
	"attachments" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"received_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "password_resets" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"user_id" uuid NOT NULL,
	"token_hash" text NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"used_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "readings" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"visit_id" uuid NOT NULL,
	"unit_id" uuid NOT NULL,
	"circuit_id" uuid NOT NULL,
	"taken_at" timestamp with time zone NOT NULL,
	"refrigerant" text NOT NULL,
	"suction_pressure" double precision,
	"liquid_pressure" double precision,
	"discharge_pressure" double precision,
	"suction_line_temp" double precision,
	"liquid_line_temp" double precision,
	"outdoor_temp" double precision,
	"suction_pressure_controller" double precision,
	"liquid_pressure_controller" double precision,
	"discharge_pressure_controller" double precision,
	"suction_saturation_temp" double precision,
	"liquid_saturation_temp" double precision,
	"superheat" double precision,
	"subcooling" double precision,
	"notes" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "refrigerant_events" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"unit_id" uuid NOT NULL,
	"visit_id" uuid,
	"date" date NOT NULL,
	"refrigerant" text NOT NULL,
	"pounds_added" double precision DEFAULT 0 NOT NULL,
	"pounds_recovered" double precision DEFAULT 0 NOT NULL,
	"reason" text NOT NULL,
	"cylinder_lot" text,
	"tech_id" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "sites" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"branch_id" uuid NOT NULL,
	"customer_id" uuid NOT NULL,
	"name" text NOT NULL,
	"address" text NOT NULL,
	"city" text DEFAULT '' NOT NULL,
	"region" text DEFAULT '' NOT NULL,
	"postal_code" text DEFAULT '' NOT NULL,
	"lat" double precision NOT NULL,
	"lon" double precision NOT NULL,
	"access_notes" text,
	"contact_name" text,
	"contact_email" text,
	"contact_phone" text,
	"archived_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "units" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"branch_id" uuid NOT NULL,
	"site_id" uuid NOT NULL,
	"tag" text NOT NULL,
	"kind" text NOT NULL,
	"make" text NOT NULL,
	"model" text NOT NULL,
	"serial" text NOT NULL,
	"install_date" date,
	"warranty_end" date,
	"refrigerant" text NOT NULL,
	"full_charge_lb" double precision NOT NULL,
	"appliance_category" text NOT NULL,
	"tonnage" double precision,
	"nameplate_attachment_id" uuid,
	"notes" text,
	"archived_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "users" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"email" text NOT NULL,
	"name" text NOT NULL,
	"role" text NOT NULL,
	"branch_id" uuid,
	"password_hash" text,
	"phone" text,
	"skills" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"epa608_type" text DEFAULT 'none' NOT NULL,
	"epa608_number" text,
	"working_hours" jsonb,
	"start_address" text,
	"start_lat" double precision,
	"start_lon" double precision,
	"color_index" integer DEFAULT 0 NOT NULL,
	"active" boolean DEFAULT true NOT NULL,
	"deactivated_at" timestamp with time zone,
	"session_version" integer DEFAULT 1 NOT NULL,
	"calendar_token" text,
	"last_sign_in_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "verification_tests" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"leak_case_id" uuid NOT NULL,
	"kind" text NOT NULL,
	"tested_on" date NOT NULL,
	"passed" boolean NOT NULL,
	"notes" text,
	"by_user_id" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "visit_events" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"visit_id" uuid NOT NULL,
	"state" text NOT NULL,
	"at" timestamp with time zone NOT NULL,
	"by_user_id" uuid
);
--> statement-breakpoint
CREATE TABLE "visits" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"branch_id" uuid NOT NULL,
	"work_order_id" uuid NOT NULL,
	"booking_id" uuid,
	"tech_id" uuid NOT NULL,
	"en_route_at" timestamp with time zone,
	"on_site_at" timestamp with time zone,
	"closed_at" timestamp with time zone,
	"outcome" text,
	"return_needs" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"return_notes" text,
	"notes" text,
	"labour_minutes" integer,
	"summary_sent_at" timestamp with time zone,
	"version" integer DEFAULT 1 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "warranty_claims" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"work_order_id" uuid NOT NULL,
	"status" text DEFAULT 'to_claim' NOT NULL,
	"amount_cents" integer,
	"reference" text,
	"notes" text,
	"updated_by_id" uuid,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "work_orders" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"number" integer GENERATED ALWAYS AS IDENTITY (sequence name "work_orders_number_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 10001 CACHE 1),
	"branch_id" uuid NOT NULL,
	"site_id" uuid NOT NULL,
	"unit_id" uuid,
	"agreement_id" uuid,
	"kind" text NOT NULL,
	"state" text DEFAULT 'unplaced' NOT NULL,
	"priority" text DEFAULT 'normal' NOT NULL,
	"complaint" text DEFAULT '' NOT NULL,
	"requested_from" timestamp with time zone,
	"requested_to" timestamp with time zone,
	"sla_due_at" timestamp with time zone,
	"latest_at" timestamp with time zone,
	"planned_date" date,
	"required_skill" text,
	"required_certification" text,
	"estimated_minutes" integer DEFAULT 60 NOT NULL,
	"origin_work_order_id" uuid,
	"leak_case_id" uuid,
	"return_needs" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"purpose" text,
	"outcome" text,
	"created_by_id" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"closed_at" timestamp with time zone
);
--> statement-breakpoint
ALTER TABLE "agreement_units" ADD CONSTRAINT "agreement_units_agreement_id_agreements_id_fk" FOREIGN KEY ("agreement_id") REFERENCES "public"."agreements"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "agreement_units" ADD CONSTRAINT "agreement_units_unit_id_units_id_fk" FOREIGN KEY ("unit_id") REFERENCES "public"."units"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "agreements" ADD CONSTRAINT "agreements_branch_id_branches_id_fk" FOREIGN KEY ("branch_id") REFERENCES "public"."branches"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "agreements" ADD CONSTRAINT "agreements_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alarms" ADD CONSTRAINT "alarms_branch_id_branches_id_fk" FOREIGN KEY ("branch_id") REFERENCES "public"."branches"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alarms" ADD CONSTRAINT "alarms_unit_id_units_id_fk" FOREIGN KEY ("unit_id") REFERENCES "public"."units"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "attachments" ADD CONSTRAINT "attachments_visit_id_visits_id_fk" FOREIGN KEY ("visit_id") REFERENCES "public"."visits"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "attachments" ADD CONSTRAINT "attachments_unit_id_units_id_fk" FOREIGN KEY ("unit_id") REFERENCES "public"."units"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "attachments" ADD CONSTRAINT "attachments_uploaded_by_id_users_id_fk" FOREIGN KEY ("uploaded_by_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "audit_events" ADD CONSTRAINT "audit_events_actor_id_users_id_fk" FOREIGN KEY ("actor_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bookings" ADD CONSTRAINT "bookings_branch_id_branches_id_fk" FOREIGN KEY ("branch_id") REFERENCES "public"."branches"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bookings" ADD CONSTRAINT "bookings_work_order_id_work_orders_id_fk" FOREIGN KEY ("work_order_id") REFERENCES "public"."work_orders"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bookings" ADD CONSTRAINT "bookings_tech_id_users_id_fk" FOREIGN KEY ("tech_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bookings" ADD CONSTRAINT "bookings_override_by_id_users_id_fk" FOREIGN KEY ("override_by_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bookings" ADD CONSTRAINT "bookings_created_by_id_users_id_fk" FOREIGN KEY ("created_by_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "circuits" ADD CONSTRAINT "circuits_unit_id_units_id_fk" FOREIGN KEY ("unit_id") REFERENCES "public"."units"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "customers" ADD CONSTRAINT "customers_branch_id_branches_id_fk" FOREIGN KEY ("branch_id") REFERENCES "public"."branches"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "findings" ADD CONSTRAINT "findings_visit_id_visits_id_fk" FOREIGN KEY ("visit_id") REFERENCES "public"."visits"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "findings" ADD CONSTRAINT "findings_unit_id_units_id_fk" FOREIGN KEY ("unit_id") REFERENCES "public"."units"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "invitations" ADD CONSTRAINT "invitations_branch_id_branches_id_fk" FOREIGN KEY ("branch_id") REFERENCES "public"."branches"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "invitations" ADD CONSTRAINT "invitations_invited_by_id_users_id_fk" FOREIGN KEY ("invited_by_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "leak_cases" ADD CONSTRAINT "leak_cases_branch_id_branches_id_fk" FOREIGN KEY ("branch_id") REFERENCES "public"."branches"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "leak_cases" ADD CONSTRAINT "leak_cases_unit_id_units_id_fk" FOREIGN KEY ("unit_id") REFERENCES "public"."units"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "leak_cases" ADD CONSTRAINT "leak_cases_triggering_event_id_refrigerant_events_id_fk" FOREIGN KEY ("triggering_event_id") REFERENCES "public"."refrigerant_events"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "leak_cases" ADD CONSTRAINT "leak_cases_repair_work_order_id_work_orders_id_fk" FOREIGN KEY ("repair_work_order_id") REFERENCES "public"."work_orders"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "password_resets" ADD CONSTRAINT "password_resets_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "readings" ADD CONSTRAINT "readings_visit_id_visits_id_fk" FOREIGN KEY ("visit_id") REFERENCES "public"."visits"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "readings" ADD CONSTRAINT "readings_unit_id_units_id_fk" FOREIGN KEY ("unit_id") REFERENCES "public"."units"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "readings" ADD CONSTRAINT "readings_circuit_id_circuits_id_fk" FOREIGN KEY ("circuit_id") REFERENCES "public"."circuits"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "refrigerant_events" ADD CONSTRAINT "refrigerant_events_unit_id_units_id_fk" FOREIGN KEY ("unit_id") REFERENCES "public"."units"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "refrigerant_events" ADD CONSTRAINT "refrigerant_events_visit_id_visits_id_fk" FOREIGN KEY ("visit_id") REFERENCES "public"."visits"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "refrigerant_events" ADD CONSTRAINT "refrigerant_events_tech_id_users_id_fk" FOREIGN KEY ("tech_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sites" ADD CONSTRAINT "sites_branch_id_branches_id_fk" FOREIGN KEY ("branch_id") REFERENCES "public"."branches"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sites" ADD CONSTRAINT "sites_customer_id_customers_id_fk" FOREIGN KEY ("customer_id") REFERENCES "public"."customers"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "units" ADD CONSTRAINT "units_branch_id_branches_id_fk" FOREIGN KEY ("branch_id") REFERENCES "public"."branches"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "units" ADD CONSTRAINT "units_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "users" ADD CONSTRAINT "users_branch_id_branches_id_fk" FOREIGN KEY ("branch_id") REFERENCES "public"."branches"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "verification_tests" ADD CONSTRAINT "verification_tests_leak_case_id_leak_cases_id_fk" FOREIGN KEY ("leak_case_id") REFERENCES "public"."leak_cases"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "verification_tests" ADD CONSTRAINT "verification_tests_by_user_id_users_id_fk" FOREIGN KEY ("by_user_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visit_events" ADD CONSTRAINT "visit_events_visit_id_visits_id_fk" FOREIGN KEY ("visit_id") REFERENCES "public"."visits"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visit_events" ADD CONSTRAINT "visit_events_by_user_id_users_id_fk" FOREIGN KEY ("by_user_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visits" ADD CONSTRAINT "visits_branch_id_branches_id_fk" FOREIGN KEY ("branch_id") REFERENCES "public"."branches"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visits" ADD CONSTRAINT "visits_work_order_id_work_orders_id_fk" FOREIGN KEY ("work_order_id") REFERENCES "public"."work_orders"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visits" ADD CONSTRAINT "visits_booking_id_bookings_id_fk" FOREIGN KEY ("booking_id") REFERENCES "public"."bookings"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visits" ADD CONSTRAINT "visits_tech_id_users_id_fk" FOREIGN KEY ("tech_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "warranty_claims" ADD CONSTRAINT "warranty_claims_work_order_id_work_orders_id_fk" FOREIGN KEY ("work_order_id") REFERENCES "public"."work_orders"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "warranty_claims" ADD CONSTRAINT "warranty_claims_updated_by_id_users_id_fk" FOREIGN KEY ("updated_by_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "work_orders" ADD CONSTRAINT "work_orders_branch_id_branches_id_fk" FOREIGN KEY ("branch_id") REFERENCES "public"."branches"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "work_orders" ADD CONSTRAINT "work_orders_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "work_orders" ADD CONSTRAINT "work_orders_unit_id_units_id_fk" FOREIGN KEY ("unit_id") REFERENCES "public"."units"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "work_orders" ADD CONSTRAINT "work_orders_agreement_id_agreements_id_fk" FOREIGN KEY ("agreement_id") REFERENCES "public"."agreements"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "work_orders" ADD CONSTRAINT "work_orders_origin_work_order_id_work_orders_id_fk" FOREIGN KEY ("origin_work_order_id") REFERENCES "public"."work_orders"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "work_orders" ADD CONSTRAINT "work_orders_created_by_id_users_id_fk" FOREIGN KEY ("created_by_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "agreement_units_unit_idx" ON "agreement_units" USING btree ("unit_id");--> statement-breakpoint
CREATE INDEX "agreements_branch_idx" ON "agreements" USING btree ("branch_id","term_end");--> statement-breakpoint
CREATE INDEX "agreements_site_idx" ON "agreements" USING btree ("site_id");--> statement-breakpoint
CREATE INDEX "alarms_branch_raised_idx" ON "alarms" USING btree ("branch_id","raised_at");--> statement-breakpoint
CREATE INDEX "alarms_unit_raised_idx" ON "alarms" USING btree ("unit_id","raised_at");--> statement-breakpoint
CREATE INDEX "attachments_visit_idx" ON "attachments" USING btree ("visit_id");--> statement-breakpoint
CREATE INDEX "attachments_unit_idx" ON "attachments" USING btree ("unit_id","created_at");--> statement-breakpoint
CREATE INDEX "audit_events_entity_idx" ON "audit_events" USING btree ("entity","entity_id");--> statement-breakpoint
CREATE INDEX "bookings_branch_start_idx" ON "bookings" USING btree ("branch_id","start_at");--> statement-breakpoint
CREATE INDEX "bookings_tech_start_idx" ON "bookings" USING btree ("tech_id","start_at");--> statement-breakpoint
CREATE INDEX "bookings_work_order_idx" ON "bookings" USING btree ("work_order_id");--> statement-breakpoint
CREATE UNIQUE INDEX "branches_code_uq" ON "branches" USING btree ("code");--> statement-breakpoint
CREATE UNIQUE INDEX "circuits_unit_number_uq" ON "circuits" USING btree ("unit_id","number");--> statement-breakpoint
CREATE INDEX "customers_branch_idx" ON "customers" USING btree ("branch_id","name");--> statement-breakpoint
CREATE INDEX "findings_visit_idx" ON "findings" USING btree ("visit_id");--> statement-breakpoint
CREATE INDEX "findings_unit_idx" ON "findings" USING btree ("unit_id","created_at");--> statement-breakpoint
CREATE UNIQUE INDEX "invitations_token_uq" ON "invitations" USING btree ("token_hash");--> statement-breakpoint
CREATE INDEX "leak_cases_branch_status_idx" ON "leak_cases" USING btree ("branch_id","status");--> statement-breakpoint
CREATE INDEX "leak_cases_unit_idx" ON "leak_cases" USING btree ("unit_id");--> statement-breakpoint
CREATE INDEX "mail_outbox_received_idx" ON "mail_outbox" USING btree ("received_at");--> statement-breakpoint
CREATE UNIQUE INDEX "password_resets_token_uq" ON "password_resets" USING btree ("token_hash");--> statement-breakpoint
CREATE INDEX "readings_unit_idx" ON "readings" USING btree ("unit_id","taken_at");--> statement-breakpoint
CREATE INDEX "readings_visit_idx" ON "readings" USING btree ("visit_id");--> statement-breakpoint
CREATE INDEX "refrigerant_events_unit_idx" ON "refrigerant_events" USING btree ("unit_id","date");--> statement-breakpoint
CREATE INDEX "sites_branch_idx" ON "sites" USING btree ("branch_id","name");--> statement-breakpoint
CREATE INDEX "sites_customer_idx" ON "sites" USING btree ("customer_id");--> statement-breakpoint
CREATE UNIQUE INDEX "units_make_serial_uq" ON "units" USING btree ("make","serial");--> statement-breakpoint
CREATE INDEX "units_site_idx" ON "units" USING btree ("site_id");--> statement-breakpoint
CREATE INDEX "units_branch_idx" ON "units" USING btree ("branch_id");--> statement-breakpoint
CREATE INDEX "units_make_model_idx" ON "units" USING btree ("make","model");--> statement-breakpoint
CREATE UNIQUE INDEX "users_email_uq" ON "users" USING btree ("email");--> statement-breakpoint
CREATE UNIQUE INDEX "users_calendar_token_uq" ON "users" USING btree ("calendar_token");--> statement-breakpoint
CREATE INDEX "users_branch_role_idx" ON "users" USING btree ("branch_id","role");--> statement-breakpoint
CREATE INDEX "verification_tests_case_idx" ON "verification_tests" USING btree ("leak_case_id");--> statement-breakpoint
CREATE INDEX "visit_events_visit_idx" ON "visit_events" USING btree ("visit_id","at");--> statement-breakpoint
CREATE INDEX "visits_work_order_idx" ON "visits" USING btree ("work_order_id");--> statement-breakpoint
CREATE INDEX "visits_tech_idx" ON "visits" USING btree ("tech_id","created_at");--> statement-breakpoint
CREATE INDEX "visits_closed_idx" ON "visits" USING btree ("branch_id","closed_at");--> statement-breakpoint
CREATE UNIQUE INDEX "visits_booking_uq" ON "visits" USING btree ("booking_id");--> statement-breakpoint
CREATE UNIQUE INDEX "warranty_claims_work_order_uq" ON "warranty_claims" USING btree ("work_order_id");--> statement-breakpoint
CREATE INDEX "work_orders_branch_state_idx" ON "work_orders" USING btree ("branch_id","state");--> statement-breakpoint
CREATE INDEX "work_orders_unit_idx" ON "work_orders" USING btree ("unit_id","created_at");--> statement-breakpoint
CREATE INDEX "work_orders_origin_idx" ON "work_orders" USING btree ("origin_work_order_id");--> statement-breakpoint
CREATE INDEX "work_orders_agreement_idx" ON "work_orders" USING btree ("agreement_id","planned_date");--> statement-breakpoint
CREATE INDEX "work_orders_created_idx" ON "work_orders" USING btree ("created_at");
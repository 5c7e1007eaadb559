CREATE TABLE "alarm_deliveries" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"source_id" uuid NOT NULL,
	"branch_id" uuid NOT NULL,
	"delivery_id" text,
	"status" text NOT NULL,
	"reason" text,
	"unit_tag" text,
	"code" text,
	"circuit" integer,
	"raised_at" timestamp with time zone,
	"message" text,
	"alarm_id" uuid,
	"received_at" timestamp with time zone NOT NULL
);
--> statement-breakpoint
CREATE TABLE "alarm_sources" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"branch_id" uuid NOT NULL,
	"site_id" uuid NOT NULL,
	"name" text NOT NULL,
	"secret_box" text NOT NULL,
	"previous_secret_box" text,
	"previous_valid_until" timestamp with time zone,
	"disabled_at" timestamp with time zone,
	"created_by_id" uuid,
	"rotated_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "repeat_alarm_notices" (
	"unit_id" uuid NOT NULL,
	"day" date NOT NULL,
	"code" text NOT NULL,
	"sent_at" timestamp with time zone NOT NULL,
	CONSTRAINT "repeat_alarm_notices_unit_id_day_pk" PRIMARY KEY("unit_id","day")
);
--> statement-breakpoint
ALTER TABLE "alarm_deliveries" ADD CONSTRAINT "alarm_deliveries_source_id_alarm_sources_id_fk" FOREIGN KEY ("source_id") REFERENCES "public"."alarm_sources"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alarm_deliveries" ADD CONSTRAINT "alarm_deliveries_branch_id_branches_id_fk" FOREIGN KEY ("branch_id") REFERENCES "public"."branches"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alarm_deliveries" ADD CONSTRAINT "alarm_deliveries_alarm_id_alarms_id_fk" FOREIGN KEY ("alarm_id") REFERENCES "public"."alarms"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alarm_sources" ADD CONSTRAINT "alarm_sources_branch_id_branches_id_fk" FOREIGN KEY ("branch_id") REFERENCES "public"."branches"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alarm_sources" ADD CONSTRAINT "alarm_sources_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alarm_sources" ADD CONSTRAINT "alarm_sources_created_by_id_users_id_fk" FOREIGN KEY ("created_by_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "repeat_alarm_notices" ADD CONSTRAINT "repeat_alarm_notices_unit_id_units_id_fk" FOREIGN KEY ("unit_id") REFERENCES "public"."units"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "alarm_deliveries_source_delivery_uq" ON "alarm_deliveries" USING btree ("source_id","delivery_id");--> statement-breakpoint
CREATE INDEX "alarm_deliveries_source_received_idx" ON "alarm_deliveries" USING btree ("source_id","received_at");--> statement-breakpoint
CREATE INDEX "alarm_sources_branch_idx" ON "alarm_sources" USING btree ("branch_id");--> statement-breakpoint
CREATE INDEX "alarm_sources_site_idx" ON "alarm_sources" USING btree ("site_id");
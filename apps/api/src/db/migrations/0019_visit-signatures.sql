CREATE TABLE "visit_signatures" (
	"visit_id" uuid PRIMARY KEY NOT NULL,
	"signer_name" text,
	"signed_at" timestamp with time zone,
	"image_png" "bytea",
	"recorded_at" timestamp with time zone NOT NULL,
	CONSTRAINT "visit_signatures_signed_ck" CHECK (("visit_signatures"."signer_name" is null and "visit_signatures"."signed_at" is null and "visit_signatures"."image_png" is null) or ("visit_signatures"."signer_name" is not null and "visit_signatures"."signed_at" is not null and "visit_signatures"."image_png" is not null))
);
--> statement-breakpoint
ALTER TABLE "visit_signatures" ADD CONSTRAINT "visit_signatures_visit_id_visits_id_fk" FOREIGN KEY ("visit_id") REFERENCES "public"."visits"("id") ON DELETE cascade ON UPDATE no action;
CREATE TABLE "ended_sessions" (
	"session_id" text PRIMARY KEY NOT NULL,
	"user_id" uuid NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"ended_at" timestamp with time zone NOT NULL
);
--> statement-breakpoint
ALTER TABLE "ended_sessions" ADD CONSTRAINT "ended_sessions_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "ended_sessions_expires_idx" ON "ended_sessions" USING btree ("expires_at");--> statement-breakpoint
-- The embedded database keeps signed-in users in process memory (migration 0006): a session ended here must
-- drop its user's cached entries at once, so the insert notifies on the same channel as a changed user row.
-- (Rows are only deleted once their token has expired, which the token itself already says: no notice.)
CREATE OR REPLACE FUNCTION notify_session_end() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM pg_notify('coilpath_user', NEW.user_id::text);
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER session_end AFTER INSERT ON ended_sessions FOR EACH ROW EXECUTE FUNCTION notify_session_end();

CREATE TYPE "public"."mail_kind" AS ENUM('review-requested', 'review-outcome', 'note-mention');--> statement-breakpoint
CREATE TYPE "public"."signature_meaning" AS ENUM('reviewed', 'approved', 'returned');--> statement-breakpoint
CREATE TABLE "subjects" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"study_id" uuid NOT NULL,
	"code" text NOT NULL,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "audit_chain_start" (
	"singleton" boolean PRIMARY KEY DEFAULT true NOT NULL,
	"last_unchained_id" bigint NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "audit_chain_start_one_row" CHECK ("audit_chain_start"."singleton")
);
--> statement-breakpoint
CREATE TABLE "mail_mutes" (
	"user_id" text NOT NULL,
	"kind" "mail_kind" NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "mail_mutes_user_id_kind_pk" PRIMARY KEY("user_id","kind")
);
--> statement-breakpoint
CREATE TABLE "notes" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"analysis_session_id" uuid NOT NULL,
	"parent_id" uuid,
	"recipe_version_id" uuid,
	"anchor" jsonb,
	"author_id" text NOT NULL,
	"body" text NOT NULL,
	"mentions" text[] DEFAULT '{}'::text[] NOT NULL,
	"revision" integer DEFAULT 1 NOT NULL,
	"client_key" uuid,
	"resolved_at" timestamp with time zone,
	"resolved_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "recipe_versions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"analysis_session_id" uuid NOT NULL,
	"number" integer NOT NULL,
	"recipe" jsonb NOT NULL,
	"recipe_hash" text NOT NULL,
	"created_by" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "signatures" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"analysis_session_id" uuid NOT NULL,
	"recipe_version_id" uuid NOT NULL,
	"recipe_version_number" integer NOT NULL,
	"signer_id" text NOT NULL,
	"printed_name" text NOT NULL,
	"meaning" "signature_meaning" NOT NULL,
	"reason" text,
	"content_hash" text NOT NULL,
	"signed_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "summaries" (
	"recipe_version_id" uuid PRIMARY KEY NOT NULL,
	"summary" jsonb NOT NULL,
	"summary_hash" text NOT NULL,
	"bytes" integer NOT NULL,
	"uploaded_by" text NOT NULL,
	"uploaded_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "analysis_sessions" ADD COLUMN "subject_id" uuid;--> statement-breakpoint
-- data: every existing session's subject code becomes a subject of its study, then the column is required.
INSERT INTO "subjects" ("study_id", "code", "created_by", "created_at")
  SELECT DISTINCT ON ("study_id", "subject_code") "study_id", "subject_code", "owner_id", "created_at"
  FROM "analysis_sessions" ORDER BY "study_id", "subject_code", "created_at";--> statement-breakpoint
UPDATE "analysis_sessions" s SET "subject_id" = j."id" FROM "subjects" j WHERE j."study_id" = s."study_id" AND j."code" = s."subject_code";--> statement-breakpoint
ALTER TABLE "analysis_sessions" ALTER COLUMN "subject_id" SET NOT NULL;--> statement-breakpoint
ALTER TABLE "analysis_sessions" ADD COLUMN "current_version" integer;--> statement-breakpoint
ALTER TABLE "analysis_sessions" ADD COLUMN "return_reason" text;--> statement-breakpoint
ALTER TABLE "audit_events" ADD COLUMN "prev_hash" text;--> statement-breakpoint
ALTER TABLE "audit_events" ADD COLUMN "hash" text;--> statement-breakpoint
ALTER TABLE "subjects" ADD CONSTRAINT "subjects_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "subjects" ADD CONSTRAINT "subjects_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "mail_mutes" ADD CONSTRAINT "mail_mutes_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "notes" ADD CONSTRAINT "notes_analysis_session_id_analysis_sessions_id_fk" FOREIGN KEY ("analysis_session_id") REFERENCES "public"."analysis_sessions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "notes" ADD CONSTRAINT "notes_parent_id_notes_id_fk" FOREIGN KEY ("parent_id") REFERENCES "public"."notes"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "notes" ADD CONSTRAINT "notes_recipe_version_id_recipe_versions_id_fk" FOREIGN KEY ("recipe_version_id") REFERENCES "public"."recipe_versions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "notes" ADD CONSTRAINT "notes_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "notes" ADD CONSTRAINT "notes_resolved_by_users_id_fk" FOREIGN KEY ("resolved_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "recipe_versions" ADD CONSTRAINT "recipe_versions_analysis_session_id_analysis_sessions_id_fk" FOREIGN KEY ("analysis_session_id") REFERENCES "public"."analysis_sessions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "recipe_versions" ADD CONSTRAINT "recipe_versions_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "signatures" ADD CONSTRAINT "signatures_analysis_session_id_analysis_sessions_id_fk" FOREIGN KEY ("analysis_session_id") REFERENCES "public"."analysis_sessions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "signatures" ADD CONSTRAINT "signatures_recipe_version_id_recipe_versions_id_fk" FOREIGN KEY ("recipe_version_id") REFERENCES "public"."recipe_versions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "signatures" ADD CONSTRAINT "signatures_signer_id_users_id_fk" FOREIGN KEY ("signer_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "summaries" ADD CONSTRAINT "summaries_recipe_version_id_recipe_versions_id_fk" FOREIGN KEY ("recipe_version_id") REFERENCES "public"."recipe_versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "summaries" ADD CONSTRAINT "summaries_uploaded_by_users_id_fk" FOREIGN KEY ("uploaded_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "subjects_study_code_idx" ON "subjects" USING btree ("study_id","code");--> statement-breakpoint
CREATE INDEX "notes_session_idx" ON "notes" USING btree ("analysis_session_id");--> statement-breakpoint
CREATE INDEX "notes_parent_idx" ON "notes" USING btree ("parent_id");--> statement-breakpoint
CREATE UNIQUE INDEX "notes_author_client_key_idx" ON "notes" USING btree ("author_id","client_key");--> statement-breakpoint
CREATE UNIQUE INDEX "recipe_versions_session_number_idx" ON "recipe_versions" USING btree ("analysis_session_id","number");--> statement-breakpoint
CREATE INDEX "signatures_session_idx" ON "signatures" USING btree ("analysis_session_id");--> statement-breakpoint
ALTER TABLE "analysis_sessions" ADD CONSTRAINT "analysis_sessions_subject_id_subjects_id_fk" FOREIGN KEY ("subject_id") REFERENCES "public"."subjects"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "audit_events_team_id_idx" ON "audit_events" USING btree ("team_id","id");--> statement-breakpoint
-- data: the hash chain starts after the events that exist now; those keep null hashes and are listed, not verified.
INSERT INTO "audit_chain_start" ("singleton", "last_unchained_id") SELECT true, coalesce(max("id"), 0) FROM "audit_events";--> statement-breakpoint
-- by hand: what was signed and the numbers it was signed over are never rewritten, whoever connects (a cascade
-- delete of a whole study still removes them).
CREATE FUNCTION "tidemark_refuse_update"() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  RAISE EXCEPTION '% rows are written once and never changed', TG_TABLE_NAME;
END $$;--> statement-breakpoint
CREATE TRIGGER "recipe_versions_write_once" BEFORE UPDATE ON "recipe_versions" FOR EACH ROW EXECUTE FUNCTION "tidemark_refuse_update"();--> statement-breakpoint
CREATE TRIGGER "summaries_write_once" BEFORE UPDATE ON "summaries" FOR EACH ROW EXECUTE FUNCTION "tidemark_refuse_update"();--> statement-breakpoint
CREATE TRIGGER "signatures_write_once" BEFORE UPDATE ON "signatures" FOR EACH ROW EXECUTE FUNCTION "tidemark_refuse_update"();
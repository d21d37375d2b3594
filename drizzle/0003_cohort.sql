CREATE TABLE "cohort_designs" (
	"study_id" uuid PRIMARY KEY NOT NULL,
	"design" jsonb NOT NULL,
	"revision" integer DEFAULT 1 NOT NULL,
	"updated_by" text,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "subject_covariates" (
	"subject_id" uuid NOT NULL,
	"name" text NOT NULL,
	"value" double precision NOT NULL,
	"updated_by" text,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "subject_covariates_subject_id_name_pk" PRIMARY KEY("subject_id","name")
);
--> statement-breakpoint
CREATE TABLE "summary_digests" (
	"recipe_version_id" uuid PRIMARY KEY NOT NULL,
	"outline" jsonb NOT NULL,
	"digest" jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "cohort_designs" ADD CONSTRAINT "cohort_designs_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "cohort_designs" ADD CONSTRAINT "cohort_designs_updated_by_users_id_fk" FOREIGN KEY ("updated_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "subject_covariates" ADD CONSTRAINT "subject_covariates_subject_id_subjects_id_fk" FOREIGN KEY ("subject_id") REFERENCES "public"."subjects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "subject_covariates" ADD CONSTRAINT "subject_covariates_updated_by_users_id_fk" FOREIGN KEY ("updated_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "summary_digests" ADD CONSTRAINT "summary_digests_recipe_version_id_recipe_versions_id_fk" FOREIGN KEY ("recipe_version_id") REFERENCES "public"."recipe_versions"("id") ON DELETE cascade ON UPDATE no action;
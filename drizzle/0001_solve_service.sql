CREATE TABLE "model_revisions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"model_id" uuid NOT NULL,
	"number" integer NOT NULL,
	"content" jsonb NOT NULL,
	"content_hash" text NOT NULL,
	"reason" text NOT NULL,
	"issued_at" timestamp with time zone DEFAULT now() NOT NULL,
	"issued_by_id" uuid NOT NULL,
	CONSTRAINT "model_revisions_number_positive" CHECK ("model_revisions"."number" >= 1)
);
--> statement-breakpoint
CREATE TABLE "models" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"project_id" uuid NOT NULL,
	"sif_id" uuid NOT NULL,
	"name" text NOT NULL,
	"kind" text NOT NULL,
	"draft_content" jsonb NOT NULL,
	"draft_issues" jsonb NOT NULL,
	"draft_version" integer DEFAULT 1 NOT NULL,
	"draft_updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"draft_updated_by_id" uuid NOT NULL,
	"latest_revision" integer,
	"created_by_id" uuid NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "models_kind_valid" CHECK ("models"."kind" in ('fault-tree', 'markov')),
	CONSTRAINT "models_draft_version_positive" CHECK ("models"."draft_version" >= 1)
);
--> statement-breakpoint
CREATE TABLE "solve_results" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"cache_key" text NOT NULL,
	"content_hash" text NOT NULL,
	"solver_version" text NOT NULL,
	"settings" jsonb NOT NULL,
	"result" jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "solves" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"project_id" uuid NOT NULL,
	"model_id" uuid NOT NULL,
	"revision_id" uuid,
	"revision_number" integer,
	"draft_version" integer,
	"model" jsonb NOT NULL,
	"content_hash" text NOT NULL,
	"solver_version" text NOT NULL,
	"settings" jsonb NOT NULL,
	"status" text DEFAULT 'queued' NOT NULL,
	"progress" double precision DEFAULT 0 NOT NULL,
	"stage" text,
	"error" text,
	"cached" boolean DEFAULT false NOT NULL,
	"cancel_requested" boolean DEFAULT false NOT NULL,
	"result_id" uuid,
	"job_id" text,
	"worker_name" text,
	"heartbeat_at" timestamp with time zone,
	"requested_by_id" uuid NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"started_at" timestamp with time zone,
	"finished_at" timestamp with time zone,
	CONSTRAINT "solves_status_valid" CHECK ("solves"."status" in ('queued', 'running', 'succeeded', 'failed', 'cancelled')),
	CONSTRAINT "solves_progress_fraction" CHECK ("solves"."progress" between 0 and 1),
	CONSTRAINT "solves_source_one" CHECK (("solves"."revision_number" is null) <> ("solves"."draft_version" is null))
);
--> statement-breakpoint
ALTER TABLE "model_revisions" ADD CONSTRAINT "model_revisions_model_id_models_id_fk" FOREIGN KEY ("model_id") REFERENCES "public"."models"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "model_revisions" ADD CONSTRAINT "model_revisions_issued_by_id_users_id_fk" FOREIGN KEY ("issued_by_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "models" ADD CONSTRAINT "models_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "models" ADD CONSTRAINT "models_sif_id_sifs_id_fk" FOREIGN KEY ("sif_id") REFERENCES "public"."sifs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "models" ADD CONSTRAINT "models_draft_updated_by_id_users_id_fk" FOREIGN KEY ("draft_updated_by_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "models" ADD CONSTRAINT "models_created_by_id_users_id_fk" FOREIGN KEY ("created_by_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "solves" ADD CONSTRAINT "solves_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "solves" ADD CONSTRAINT "solves_model_id_models_id_fk" FOREIGN KEY ("model_id") REFERENCES "public"."models"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "solves" ADD CONSTRAINT "solves_revision_id_model_revisions_id_fk" FOREIGN KEY ("revision_id") REFERENCES "public"."model_revisions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "solves" ADD CONSTRAINT "solves_result_id_solve_results_id_fk" FOREIGN KEY ("result_id") REFERENCES "public"."solve_results"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "solves" ADD CONSTRAINT "solves_requested_by_id_users_id_fk" FOREIGN KEY ("requested_by_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "model_revisions_model_number_unique" ON "model_revisions" USING btree ("model_id","number");--> statement-breakpoint
CREATE INDEX "models_sif_idx" ON "models" USING btree ("sif_id");--> statement-breakpoint
CREATE INDEX "models_project_idx" ON "models" USING btree ("project_id");--> statement-breakpoint
CREATE UNIQUE INDEX "solve_results_cache_key_unique" ON "solve_results" USING btree ("cache_key");--> statement-breakpoint
CREATE INDEX "solves_model_created_idx" ON "solves" USING btree ("model_id","created_at");--> statement-breakpoint
CREATE INDEX "solves_content_hash_idx" ON "solves" USING btree ("content_hash");--> statement-breakpoint
CREATE INDEX "solves_running_idx" ON "solves" USING btree ("status") WHERE "solves"."status" = 'running';
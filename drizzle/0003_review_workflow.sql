CREATE TABLE "annotation_replies" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"annotation_id" uuid NOT NULL,
	"author_id" uuid NOT NULL,
	"body" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "annotations" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"project_id" uuid NOT NULL,
	"sif_id" uuid NOT NULL,
	"model_id" uuid NOT NULL,
	"revision" integer NOT NULL,
	"target_kind" text NOT NULL,
	"item_id" text,
	"item_snapshot" jsonb,
	"severity" text NOT NULL,
	"status" text DEFAULT 'open' NOT NULL,
	"body" text NOT NULL,
	"author_id" uuid NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"resolved_by_id" uuid,
	"resolved_at" timestamp with time zone,
	CONSTRAINT "annotations_target_kind_valid" CHECK ("annotations"."target_kind" in ('gate', 'event', 'ccf', 'state', 'transition', 'model', 'result')),
	CONSTRAINT "annotations_severity_valid" CHECK ("annotations"."severity" in ('question', 'remark', 'must-fix')),
	CONSTRAINT "annotations_status_valid" CHECK ("annotations"."status" in ('open', 'resolved')),
	CONSTRAINT "annotations_revision_positive" CHECK ("annotations"."revision" >= 1)
);
--> statement-breakpoint
CREATE TABLE "audit_events" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"project_id" uuid NOT NULL,
	"sif_id" uuid,
	"actor_id" uuid,
	"actor_name" text NOT NULL,
	"action" text NOT NULL,
	"summary" text NOT NULL,
	"details" jsonb NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "audit_events_action_valid" CHECK ("audit_events"."action" in ('revision.issued', 'review.requested', 'review.approved', 'review.returned', 'annotation.created', 'annotation.replied', 'annotation.resolved', 'annotation.reopened', 'member.role-changed', 'member.removed'))
);
--> statement-breakpoint
CREATE TABLE "mail_messages" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"kind" text NOT NULL,
	"to_user_id" uuid,
	"to_address" text NOT NULL,
	"subject" text NOT NULL,
	"text" text NOT NULL,
	"sent_at" timestamp with time zone DEFAULT now() NOT NULL,
	"error" text,
	CONSTRAINT "mail_messages_kind_valid" CHECK ("mail_messages"."kind" in ('review-requested', 'comment', 'review-approved', 'review-returned'))
);
--> statement-breakpoint
CREATE TABLE "notice_settings" (
	"user_id" uuid PRIMARY KEY NOT NULL,
	"notices" boolean DEFAULT true NOT NULL
);
--> statement-breakpoint
CREATE TABLE "review_round_reviewers" (
	"round_id" uuid NOT NULL,
	"user_id" uuid NOT NULL,
	CONSTRAINT "review_round_reviewers_pk" PRIMARY KEY("round_id","user_id")
);
--> statement-breakpoint
CREATE TABLE "review_rounds" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"project_id" uuid NOT NULL,
	"sif_id" uuid NOT NULL,
	"model_id" uuid NOT NULL,
	"revision" integer NOT NULL,
	"message" text NOT NULL,
	"status" text DEFAULT 'open' NOT NULL,
	"requested_by_id" uuid NOT NULL,
	"requested_at" timestamp with time zone DEFAULT now() NOT NULL,
	"decided_by_id" uuid,
	"decided_at" timestamp with time zone,
	"decision_comment" text DEFAULT '' NOT NULL,
	CONSTRAINT "review_rounds_status_valid" CHECK ("review_rounds"."status" in ('open', 'approved', 'returned'))
);
--> statement-breakpoint
ALTER TABLE "annotation_replies" ADD CONSTRAINT "annotation_replies_annotation_id_annotations_id_fk" FOREIGN KEY ("annotation_id") REFERENCES "public"."annotations"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "annotation_replies" ADD CONSTRAINT "annotation_replies_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "annotations" ADD CONSTRAINT "annotations_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "annotations" ADD CONSTRAINT "annotations_sif_id_sifs_id_fk" FOREIGN KEY ("sif_id") REFERENCES "public"."sifs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "annotations" ADD CONSTRAINT "annotations_model_id_models_id_fk" FOREIGN KEY ("model_id") REFERENCES "public"."models"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "annotations" ADD CONSTRAINT "annotations_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "annotations" ADD CONSTRAINT "annotations_resolved_by_id_users_id_fk" FOREIGN KEY ("resolved_by_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "audit_events" ADD CONSTRAINT "audit_events_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "audit_events" ADD CONSTRAINT "audit_events_sif_id_sifs_id_fk" FOREIGN KEY ("sif_id") REFERENCES "public"."sifs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "audit_events" ADD CONSTRAINT "audit_events_actor_id_users_id_fk" FOREIGN KEY ("actor_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "mail_messages" ADD CONSTRAINT "mail_messages_to_user_id_users_id_fk" FOREIGN KEY ("to_user_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "notice_settings" ADD CONSTRAINT "notice_settings_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "review_round_reviewers" ADD CONSTRAINT "review_round_reviewers_round_id_review_rounds_id_fk" FOREIGN KEY ("round_id") REFERENCES "public"."review_rounds"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "review_round_reviewers" ADD CONSTRAINT "review_round_reviewers_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "review_rounds" ADD CONSTRAINT "review_rounds_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "review_rounds" ADD CONSTRAINT "review_rounds_sif_id_sifs_id_fk" FOREIGN KEY ("sif_id") REFERENCES "public"."sifs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "review_rounds" ADD CONSTRAINT "review_rounds_model_id_models_id_fk" FOREIGN KEY ("model_id") REFERENCES "public"."models"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "review_rounds" ADD CONSTRAINT "review_rounds_requested_by_id_users_id_fk" FOREIGN KEY ("requested_by_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "review_rounds" ADD CONSTRAINT "review_rounds_decided_by_id_users_id_fk" FOREIGN KEY ("decided_by_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "annotation_replies_annotation_idx" ON "annotation_replies" USING btree ("annotation_id");--> statement-breakpoint
CREATE INDEX "annotations_model_idx" ON "annotations" USING btree ("model_id");--> statement-breakpoint
CREATE INDEX "audit_events_project_at_idx" ON "audit_events" USING btree ("project_id","at");--> statement-breakpoint
CREATE INDEX "audit_events_sif_at_idx" ON "audit_events" USING btree ("sif_id","at");--> statement-breakpoint
CREATE INDEX "mail_messages_sent_idx" ON "mail_messages" USING btree ("sent_at");--> statement-breakpoint
CREATE INDEX "review_round_reviewers_user_idx" ON "review_round_reviewers" USING btree ("user_id");--> statement-breakpoint
CREATE INDEX "review_rounds_sif_idx" ON "review_rounds" USING btree ("sif_id");--> statement-breakpoint
CREATE INDEX "review_rounds_model_idx" ON "review_rounds" USING btree ("model_id");
CREATE TABLE "device_evidence" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"device_id" uuid NOT NULL,
	"device_version" integer NOT NULL,
	"file_name" text NOT NULL,
	"content_type" text NOT NULL,
	"byte_size" integer NOT NULL,
	"sha256" text NOT NULL,
	"description" text DEFAULT '' NOT NULL,
	"content" "bytea" NOT NULL,
	"uploaded_at" timestamp with time zone DEFAULT now() NOT NULL,
	"uploaded_by_id" uuid NOT NULL,
	CONSTRAINT "device_evidence_content_type_valid" CHECK ("device_evidence"."content_type" in ('application/pdf', 'image/png', 'image/jpeg')),
	CONSTRAINT "device_evidence_byte_size_positive" CHECK ("device_evidence"."byte_size" > 0)
);
--> statement-breakpoint
CREATE TABLE "device_versions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"device_id" uuid NOT NULL,
	"version" integer NOT NULL,
	"maker" text NOT NULL,
	"model" text NOT NULL,
	"category" text NOT NULL,
	"description" text DEFAULT '' NOT NULL,
	"lambda_du" double precision NOT NULL,
	"lambda_dd" double precision NOT NULL,
	"lambda_su" double precision NOT NULL,
	"lambda_sd" double precision NOT NULL,
	"architecture_type" text NOT NULL,
	"hardware_fault_tolerance" smallint NOT NULL,
	"systematic_capability" smallint,
	"proof_test_coverage" double precision,
	"useful_life_years" double precision,
	"source_kind" text NOT NULL,
	"source_reference" text NOT NULL,
	"valid_until" date,
	"change_note" text DEFAULT '' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"created_by_id" uuid NOT NULL,
	CONSTRAINT "device_versions_version_positive" CHECK ("device_versions"."version" >= 1),
	CONSTRAINT "device_versions_category_valid" CHECK ("device_versions"."category" in ('transmitter', 'switch', 'logic-solver', 'valve', 'actuator', 'relay', 'other')),
	CONSTRAINT "device_versions_architecture_type_valid" CHECK ("device_versions"."architecture_type" in ('A', 'B')),
	CONSTRAINT "device_versions_source_kind_valid" CHECK ("device_versions"."source_kind" in ('assessment-report', 'generic-handbook', 'prior-use', 'estimate')),
	CONSTRAINT "device_versions_rates_nonnegative" CHECK ("device_versions"."lambda_du" >= 0 and "device_versions"."lambda_dd" >= 0 and "device_versions"."lambda_su" >= 0 and "device_versions"."lambda_sd" >= 0),
	CONSTRAINT "device_versions_hft_range" CHECK ("device_versions"."hardware_fault_tolerance" between 0 and 3),
	CONSTRAINT "device_versions_sc_range" CHECK ("device_versions"."systematic_capability" is null or "device_versions"."systematic_capability" between 1 and 4),
	CONSTRAINT "device_versions_ptc_range" CHECK ("device_versions"."proof_test_coverage" is null or "device_versions"."proof_test_coverage" between 0 and 1)
);
--> statement-breakpoint
CREATE TABLE "devices" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"maker" text NOT NULL,
	"model" text NOT NULL,
	"current_version" integer DEFAULT 1 NOT NULL,
	"created_by_id" uuid NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "devices_current_version_positive" CHECK ("devices"."current_version" >= 1)
);
--> statement-breakpoint
ALTER TABLE "device_evidence" ADD CONSTRAINT "device_evidence_device_id_devices_id_fk" FOREIGN KEY ("device_id") REFERENCES "public"."devices"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "device_evidence" ADD CONSTRAINT "device_evidence_uploaded_by_id_users_id_fk" FOREIGN KEY ("uploaded_by_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "device_versions" ADD CONSTRAINT "device_versions_device_id_devices_id_fk" FOREIGN KEY ("device_id") REFERENCES "public"."devices"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "device_versions" ADD CONSTRAINT "device_versions_created_by_id_users_id_fk" FOREIGN KEY ("created_by_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "devices" ADD CONSTRAINT "devices_created_by_id_users_id_fk" FOREIGN KEY ("created_by_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "device_evidence_device_idx" ON "device_evidence" USING btree ("device_id");--> statement-breakpoint
CREATE UNIQUE INDEX "device_versions_device_version_unique" ON "device_versions" USING btree ("device_id","version");--> statement-breakpoint
CREATE UNIQUE INDEX "devices_maker_model_unique" ON "devices" USING btree (lower("maker"),lower("model"));
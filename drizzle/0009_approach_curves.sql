CREATE TYPE "public"."curve_fit_status" AS ENUM('ok', 'error');--> statement-breakpoint
CREATE TABLE "approach_curves" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"lab_id" uuid NOT NULL,
	"upload_id" uuid NOT NULL,
	"session_id" uuid NOT NULL,
	"sample_id" uuid NOT NULL,
	"tip_id" uuid,
	"source_name" text NOT NULL,
	"index_in_file" integer NOT NULL,
	"label" text NOT NULL,
	"raw_sha256" text NOT NULL,
	"n_points" integer NOT NULL,
	"z_nm" "bytea" NOT NULL,
	"current_a" "bytea" NOT NULL,
	"setpoint_bias_v" double precision,
	"setpoint_current_a" double precision,
	"temperature_k" double precision,
	"meta" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"warnings" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"fit_status" "curve_fit_status" NOT NULL,
	"fit_message" text,
	"kappa_per_nm" double precision,
	"kappa_sigma_per_nm" double precision,
	"barrier_height_ev" double precision,
	"barrier_height_sigma_ev" double precision,
	"points_used" integer,
	"flags" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"sweeps" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"point_status" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "uploads" ADD COLUMN "curves_count" integer DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE "approach_curves" ADD CONSTRAINT "approach_curves_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "approach_curves" ADD CONSTRAINT "approach_curves_upload_id_uploads_id_fk" FOREIGN KEY ("upload_id") REFERENCES "public"."uploads"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "approach_curves" ADD CONSTRAINT "approach_curves_session_id_measurement_sessions_id_fk" FOREIGN KEY ("session_id") REFERENCES "public"."measurement_sessions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "approach_curves" ADD CONSTRAINT "approach_curves_sample_id_samples_id_fk" FOREIGN KEY ("sample_id") REFERENCES "public"."samples"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "approach_curves" ADD CONSTRAINT "approach_curves_tip_id_tips_id_fk" FOREIGN KEY ("tip_id") REFERENCES "public"."tips"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "approach_curves_session_idx" ON "approach_curves" USING btree ("session_id");--> statement-breakpoint
CREATE INDEX "approach_curves_sample_idx" ON "approach_curves" USING btree ("sample_id");--> statement-breakpoint
CREATE UNIQUE INDEX "approach_curves_upload_index_unique" ON "approach_curves" USING btree ("upload_id","source_name","index_in_file");
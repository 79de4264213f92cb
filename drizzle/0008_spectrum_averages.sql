CREATE TYPE "public"."spectrum_kind" AS ENUM('measured', 'average');--> statement-breakpoint
CREATE TABLE "spectrum_average_members" (
	"average_id" uuid NOT NULL,
	"member_id" uuid NOT NULL,
	"lab_id" uuid NOT NULL,
	"position" integer NOT NULL,
	"used" boolean NOT NULL,
	"left_out_reason" text,
	"statistic" double precision,
	"limit" double precision,
	"put_back" boolean DEFAULT false NOT NULL
);
--> statement-breakpoint
ALTER TABLE "spectra" ADD COLUMN "kind" "spectrum_kind" DEFAULT 'measured' NOT NULL;--> statement-breakpoint
ALTER TABLE "spectra" ADD COLUMN "stderr" "bytea";--> statement-breakpoint
ALTER TABLE "spectra" ADD COLUMN "created_by" uuid;--> statement-breakpoint
ALTER TABLE "spectrum_average_members" ADD CONSTRAINT "spectrum_average_members_average_id_spectra_id_fk" FOREIGN KEY ("average_id") REFERENCES "public"."spectra"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spectrum_average_members" ADD CONSTRAINT "spectrum_average_members_member_id_spectra_id_fk" FOREIGN KEY ("member_id") REFERENCES "public"."spectra"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spectrum_average_members" ADD CONSTRAINT "spectrum_average_members_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "spectrum_average_members_member_unique" ON "spectrum_average_members" USING btree ("member_id");--> statement-breakpoint
CREATE INDEX "spectrum_average_members_average_idx" ON "spectrum_average_members" USING btree ("average_id");--> statement-breakpoint
ALTER TABLE "spectra" ADD CONSTRAINT "spectra_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;
CREATE TYPE "public"."flagged_in_fit" AS ENUM('include', 'exclude');--> statement-breakpoint
ALTER TABLE "labs" ADD COLUMN "flagged_in_fit" "flagged_in_fit" DEFAULT 'include' NOT NULL;--> statement-breakpoint
ALTER TABLE "gap_picks" ADD COLUMN "flags" jsonb DEFAULT '[]'::jsonb NOT NULL;--> statement-breakpoint
-- Picks stored after the picker began to raise flags but before this column carry them in auto_pick.
UPDATE "gap_picks" SET "flags" = "auto_pick"->'flags' WHERE jsonb_typeof("auto_pick"->'flags') = 'array';

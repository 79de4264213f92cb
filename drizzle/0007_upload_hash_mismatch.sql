ALTER TABLE "uploads" ADD COLUMN "hash_mismatch" boolean DEFAULT false NOT NULL;--> statement-breakpoint
-- Files that failed because their stored bytes did not match the declared SHA-256 held no file but
-- blocked the hash: mark them so the genuine file can be sent again under the same row.
UPDATE "uploads" SET "hash_mismatch" = true WHERE "status" = 'failed' AND "message" LIKE 'The stored bytes do not match the file''s SHA-256%';

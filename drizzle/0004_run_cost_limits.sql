ALTER TABLE "runs" ADD COLUMN "rays_reserved" bigint;--> statement-breakpoint
ALTER TABLE "runs" ADD COLUMN "batch_events" bigint;--> statement-breakpoint
ALTER TABLE "runs" ADD COLUMN "warnings" jsonb DEFAULT '[]'::jsonb NOT NULL;
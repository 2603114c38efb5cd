ALTER TABLE "data_tables" ADD COLUMN "fit" jsonb;--> statement-breakpoint
ALTER TABLE "data_tables" ADD COLUMN "fitted_rows" jsonb;--> statement-breakpoint
ALTER TABLE "data_tables" ADD COLUMN "source_text" text;
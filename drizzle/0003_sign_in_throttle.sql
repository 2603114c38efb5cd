CREATE TABLE "sign_in_failures" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"account_key" text NOT NULL,
	"address" text NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE INDEX "sign_in_failures_account_idx" ON "sign_in_failures" USING btree ("account_key","at");--> statement-breakpoint
CREATE INDEX "sign_in_failures_address_idx" ON "sign_in_failures" USING btree ("address","at");
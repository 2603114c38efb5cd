CREATE TYPE "public"."batch_status" AS ENUM('queued', 'done', 'cancelled', 'failed');--> statement-breakpoint
CREATE TYPE "public"."cell_status" AS ENUM('queued', 'running', 'done', 'infeasible', 'cancelled', 'failed');--> statement-breakpoint
CREATE TYPE "public"."run_kind" AS ENUM('single', 'sweep');--> statement-breakpoint
CREATE TYPE "public"."run_status" AS ENUM('queued', 'running', 'done', 'cancelled', 'failed');--> statement-breakpoint
CREATE TABLE "run_batches" (
	"cell_id" uuid NOT NULL,
	"batch_index" integer NOT NULL,
	"first_ray" bigint NOT NULL,
	"ray_count" integer NOT NULL,
	"job_id" uuid NOT NULL,
	"status" "batch_status" DEFAULT 'queued' NOT NULL,
	"attempts" integer DEFAULT 0 NOT NULL,
	"compute_ms" integer,
	"worker" text,
	"error" text,
	"completed_at" timestamp with time zone,
	CONSTRAINT "run_batches_cell_id_batch_index_pk" PRIMARY KEY("cell_id","batch_index"),
	CONSTRAINT "run_batches_rays_positive" CHECK ("run_batches"."ray_count" > 0)
);
--> statement-breakpoint
CREATE TABLE "run_cells" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"run_id" uuid NOT NULL,
	"cell_index" integer NOT NULL,
	"coordinates" jsonb NOT NULL,
	"scenario" jsonb,
	"infeasible_reason" text,
	"seed" bigint NOT NULL,
	"status" "cell_status" DEFAULT 'queued' NOT NULL,
	"rays_planned" bigint DEFAULT 0 NOT NULL,
	"rays_done" bigint DEFAULT 0 NOT NULL,
	"device_tally" "bytea",
	"planar_tally" "bytea",
	"summary" jsonb,
	"stop_reason" text,
	"error" text,
	"compute_ms" integer DEFAULT 0 NOT NULL,
	"engine_version" text,
	"started_at" timestamp with time zone,
	"finished_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "runs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"project_id" uuid NOT NULL,
	"design_id" uuid,
	"design_version" integer NOT NULL,
	"design_name" text NOT NULL,
	"kind" "run_kind" NOT NULL,
	"name" text NOT NULL,
	"base_scenario" jsonb NOT NULL,
	"axes" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"figure" text DEFAULT 'enhancement' NOT NULL,
	"seed" bigint NOT NULL,
	"rays_per_cell" bigint,
	"target_std_err" double precision,
	"ray_cap" bigint,
	"batch_rays" integer NOT NULL,
	"status" "run_status" DEFAULT 'queued' NOT NULL,
	"cells_total" integer NOT NULL,
	"cells_finished" integer DEFAULT 0 NOT NULL,
	"rays_planned" bigint DEFAULT 0 NOT NULL,
	"rays_done" bigint DEFAULT 0 NOT NULL,
	"best_cell_index" integer,
	"error" text,
	"engine_version" text NOT NULL,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"started_at" timestamp with time zone,
	"finished_at" timestamp with time zone
);
--> statement-breakpoint
ALTER TABLE "run_batches" ADD CONSTRAINT "run_batches_cell_id_run_cells_id_fk" FOREIGN KEY ("cell_id") REFERENCES "public"."run_cells"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "run_cells" ADD CONSTRAINT "run_cells_run_id_runs_id_fk" FOREIGN KEY ("run_id") REFERENCES "public"."runs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_design_id_designs_id_fk" FOREIGN KEY ("design_id") REFERENCES "public"."designs"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "run_batches_job_idx" ON "run_batches" USING btree ("job_id");--> statement-breakpoint
CREATE UNIQUE INDEX "run_cells_run_cell_key" ON "run_cells" USING btree ("run_id","cell_index");--> statement-breakpoint
CREATE INDEX "runs_project_idx" ON "runs" USING btree ("project_id","created_at");
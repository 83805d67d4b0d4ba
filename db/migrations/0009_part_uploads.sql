CREATE TYPE "public"."part_upload_state" AS ENUM('checking', 'ready', 'refused');--> statement-breakpoint
CREATE TABLE "part_uploads" (
	"id" text PRIMARY KEY NOT NULL,
	"workspace_id" text NOT NULL,
	"file_name" text NOT NULL,
	"blob_key" text NOT NULL,
	"byte_size" integer NOT NULL,
	"options" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"state" "part_upload_state" DEFAULT 'checking' NOT NULL,
	"part_ids" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"error" jsonb,
	"uploaded_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"finished_at" timestamp with time zone
);
--> statement-breakpoint
ALTER TABLE "part_uploads" ADD CONSTRAINT "part_uploads_workspace_id_workspaces_id_fk" FOREIGN KEY ("workspace_id") REFERENCES "public"."workspaces"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "part_uploads" ADD CONSTRAINT "part_uploads_uploaded_by_users_id_fk" FOREIGN KEY ("uploaded_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "part_uploads_workspace_created_idx" ON "part_uploads" USING btree ("workspace_id","created_at");--> statement-breakpoint
CREATE INDEX "part_uploads_blob_idx" ON "part_uploads" USING btree ("blob_key");
CREATE TABLE "idempotency_keys" (
	"workspace_id" text NOT NULL,
	"key" text NOT NULL,
	"request_hash" text NOT NULL,
	"plate_id" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "idempotency_keys_workspace_id_key_pk" PRIMARY KEY("workspace_id","key")
);
--> statement-breakpoint
ALTER TABLE "workspaces" ADD COLUMN "webhook_secret" text;--> statement-breakpoint
ALTER TABLE "plates" ADD COLUMN "job_id" text;--> statement-breakpoint
ALTER TABLE "plates" ADD COLUMN "job_state" text DEFAULT 'queued' NOT NULL;--> statement-breakpoint
ALTER TABLE "plates" ADD COLUMN "progress" real DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE "plates" ADD COLUMN "error" jsonb;--> statement-breakpoint
ALTER TABLE "plates" ADD COLUMN "input" jsonb;--> statement-breakpoint
ALTER TABLE "plates" ADD COLUMN "callback_url" text;--> statement-breakpoint
ALTER TABLE "plates" ADD COLUMN "title" text;--> statement-breakpoint
ALTER TABLE "plates" ADD COLUMN "finished_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "idempotency_keys" ADD CONSTRAINT "idempotency_keys_workspace_id_workspaces_id_fk" FOREIGN KEY ("workspace_id") REFERENCES "public"."workspaces"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "idempotency_keys" ADD CONSTRAINT "idempotency_keys_plate_id_plates_id_fk" FOREIGN KEY ("plate_id") REFERENCES "public"."plates"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "plates_job_key" ON "plates" USING btree ("job_id");
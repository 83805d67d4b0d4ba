CREATE TABLE "floor_events" (
	"id" text PRIMARY KEY NOT NULL,
	"workspace_id" text NOT NULL,
	"plate_id" text NOT NULL,
	"from_state" text,
	"to_state" text NOT NULL,
	"note" text,
	"by_user_id" text,
	"at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "inspections" (
	"id" text PRIMARY KEY NOT NULL,
	"workspace_id" text NOT NULL,
	"plate_id" text NOT NULL,
	"results" jsonb NOT NULL,
	"first" boolean NOT NULL,
	"missing" integer NOT NULL,
	"defective" integer NOT NULL,
	"by_user_id" text,
	"at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "plates" ADD COLUMN "floor_state" text;--> statement-breakpoint
ALTER TABLE "plates" ADD COLUMN "reprint_of" text;--> statement-breakpoint
ALTER TABLE "floor_events" ADD CONSTRAINT "floor_events_workspace_id_workspaces_id_fk" FOREIGN KEY ("workspace_id") REFERENCES "public"."workspaces"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "floor_events" ADD CONSTRAINT "floor_events_plate_id_plates_id_fk" FOREIGN KEY ("plate_id") REFERENCES "public"."plates"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "floor_events" ADD CONSTRAINT "floor_events_by_user_id_users_id_fk" FOREIGN KEY ("by_user_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "inspections" ADD CONSTRAINT "inspections_workspace_id_workspaces_id_fk" FOREIGN KEY ("workspace_id") REFERENCES "public"."workspaces"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "inspections" ADD CONSTRAINT "inspections_plate_id_plates_id_fk" FOREIGN KEY ("plate_id") REFERENCES "public"."plates"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "inspections" ADD CONSTRAINT "inspections_by_user_id_users_id_fk" FOREIGN KEY ("by_user_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "floor_events_plate_idx" ON "floor_events" USING btree ("plate_id","at");--> statement-breakpoint
CREATE INDEX "inspections_workspace_at_idx" ON "inspections" USING btree ("workspace_id","at");--> statement-breakpoint
CREATE INDEX "inspections_plate_idx" ON "inspections" USING btree ("plate_id");--> statement-breakpoint
UPDATE "plates" SET "floor_state" = 'to_print' WHERE "job_state" = 'done';

ALTER TABLE "template_versions" ADD COLUMN "changes" jsonb DEFAULT '[]'::jsonb NOT NULL;--> statement-breakpoint
ALTER TABLE "template_versions" ADD COLUMN "thumbnail_state" text DEFAULT 'pending' NOT NULL;--> statement-breakpoint
ALTER TABLE "template_versions" ADD COLUMN "thumbnail_svg" text;--> statement-breakpoint
ALTER TABLE "template_versions" ADD COLUMN "findings" jsonb DEFAULT '[]'::jsonb NOT NULL;--> statement-breakpoint
ALTER TABLE "templates" ADD COLUMN "description" text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE "templates" ADD COLUMN "starter_key" text;--> statement-breakpoint
ALTER TABLE "templates" ADD CONSTRAINT "templates_starter_key_unique" UNIQUE("starter_key");
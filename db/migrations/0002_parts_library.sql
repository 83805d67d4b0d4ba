ALTER TABLE "parts" ADD COLUMN "warnings" jsonb DEFAULT '[]'::jsonb NOT NULL;--> statement-breakpoint
ALTER TABLE "parts" ADD COLUMN "unit" text DEFAULT 'millimeter' NOT NULL;--> statement-breakpoint
ALTER TABLE "parts" ADD COLUMN "lay_flat" boolean DEFAULT false NOT NULL;--> statement-breakpoint
ALTER TABLE "parts" ADD COLUMN "bodies" integer DEFAULT 1 NOT NULL;--> statement-breakpoint
ALTER TABLE "parts" ADD COLUMN "thumbnail_svg" text;
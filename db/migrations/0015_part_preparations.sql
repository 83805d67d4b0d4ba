CREATE TABLE "part_preparations" (
	"source" text PRIMARY KEY NOT NULL,
	"part_blob_key" text NOT NULL,
	"blob_key" text NOT NULL,
	"bytes" integer NOT NULL,
	"layer_heights" real[] NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE INDEX "part_preparations_part_blob_idx" ON "part_preparations" USING btree ("part_blob_key");--> statement-breakpoint
CREATE INDEX "part_preparations_blob_idx" ON "part_preparations" USING btree ("blob_key");
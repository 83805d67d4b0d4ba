CREATE TABLE "plate_files" (
	"plate_id" text NOT NULL,
	"format" text NOT NULL,
	"blob_key" text NOT NULL,
	"bytes" integer,
	"sha256" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "plate_files_plate_id_format_pk" PRIMARY KEY("plate_id","format")
);
--> statement-breakpoint
ALTER TABLE "plate_files" ADD CONSTRAINT "plate_files_plate_id_plates_id_fk" FOREIGN KEY ("plate_id") REFERENCES "public"."plates"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "plate_files_blob_idx" ON "plate_files" USING btree ("blob_key");--> statement-breakpoint
-- The files of plates made before this table: blob keys are SHA-256 digests of their content.
INSERT INTO "plate_files" ("plate_id", "format", "blob_key", "sha256", "created_at")
  SELECT "id", 'stl', "stl_blob_key", "stl_blob_key", coalesce("finished_at", "created_at") FROM "plates" WHERE "stl_blob_key" IS NOT NULL
  UNION ALL
  SELECT "id", '3mf', "three_mf_blob_key", "three_mf_blob_key", coalesce("finished_at", "created_at") FROM "plates" WHERE "three_mf_blob_key" IS NOT NULL;--> statement-breakpoint
ALTER TABLE "plates" DROP COLUMN "stl_blob_key";--> statement-breakpoint
ALTER TABLE "plates" DROP COLUMN "three_mf_blob_key";
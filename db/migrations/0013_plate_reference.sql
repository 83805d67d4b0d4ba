ALTER TABLE "plates" ADD COLUMN "reference" text;--> statement-breakpoint
CREATE INDEX "plates_workspace_reference_idx" ON "plates" USING btree ("workspace_id","reference");

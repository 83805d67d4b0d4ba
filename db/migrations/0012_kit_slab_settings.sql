-- A kit keeps its last slab settings (the slab editor's options, values and template); null: the editor's defaults.
ALTER TABLE "kits" ADD COLUMN "slab_settings" jsonb;

-- Template names become unique per workspace, ignoring case. A workspace may already hold two templates
-- whose names differ only in case (or not at all): the older keeps its name, each later one gets " (2)",
-- " (3)", … — the first number that names no template of that workspace — so the index below cannot fail.
-- Starters (workspace_id null) are left alone: nulls never collide in a unique index.
DO $$
DECLARE
  r record;
  n integer;
  candidate text;
BEGIN
  FOR r IN
    SELECT "id", "workspace_id", "name", "rank"
    FROM (
      SELECT "id", "workspace_id", "name",
        row_number() OVER (PARTITION BY "workspace_id", lower("name") ORDER BY "created_at", "id") AS "rank"
      FROM "templates"
      WHERE "workspace_id" IS NOT NULL
    ) ranked
    WHERE "rank" > 1
    ORDER BY "workspace_id", lower("name"), "rank"
  LOOP
    n := r."rank";
    LOOP
      candidate := r."name" || ' (' || n || ')';
      EXIT WHEN NOT EXISTS (
        SELECT 1 FROM "templates" t WHERE t."workspace_id" = r."workspace_id" AND lower(t."name") = lower(candidate)
      );
      n := n + 1;
    END LOOP;
    UPDATE "templates" SET "name" = candidate WHERE "id" = r."id";
  END LOOP;
END $$;--> statement-breakpoint
CREATE UNIQUE INDEX "templates_workspace_name_key" ON "templates" USING btree ("workspace_id",lower("name"));

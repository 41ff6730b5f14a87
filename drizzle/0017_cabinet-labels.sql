-- Existing installations may hold two cabinets of one name at a depot: the later ones are renamed
-- "<label> (2)", "<label> (3)" so the index can be made and nothing is lost.
UPDATE "power_cabinets" c SET "label" = c."label" || ' (' || d.n || ')'
  FROM (
    SELECT "id", row_number() OVER (PARTITION BY "depot_id", "label" ORDER BY "created_at", "id") AS n
    FROM "power_cabinets"
  ) d
  WHERE d."id" = c."id" AND d.n > 1;
--> statement-breakpoint
CREATE UNIQUE INDEX "power_cabinets_depot_label_key" ON "power_cabinets" USING btree ("depot_id","label");

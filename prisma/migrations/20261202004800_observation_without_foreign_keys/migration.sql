-- Observation keeps its relations in schema.prisma (the client joins through them) but has no
-- FOREIGN KEY in the database: the two per-row checks (each locks its Epoch and Point row) cost more
-- than the rest of a 2,000-point epoch's insert (20.5 ms against 6.4 ms without them, measured on
-- PostgreSQL 15 in a scratch database). Rows are written only by the ingest service, with the epoch
-- ids it has just inserted and the point ids it has just read or registered, in one transaction
-- under the site's lock (test/db/ingest/result-integrity.test.ts checks the invariant).
-- What the keys also gave, refusing to delete an epoch or a point that has observations
-- (ON DELETE RESTRICT), is kept by the triggers below (deletes are rare, inserts pay nothing).

-- DropForeignKey
ALTER TABLE "Observation" DROP CONSTRAINT "Observation_epochId_fkey";

-- DropForeignKey
ALTER TABLE "Observation" DROP CONSTRAINT "Observation_pointId_fkey";

-- The migration runner splits a script at every semicolon (inside quotes and comments too), so the
-- body is an escape string with each semicolon written as its octal code, backslash 073.
CREATE FUNCTION epochal_keep_observed() RETURNS trigger LANGUAGE plpgsql AS E'
BEGIN
  IF TG_TABLE_NAME = ''Epoch'' AND EXISTS (SELECT 1 FROM "Observation" WHERE "epochId" = OLD.id) THEN
    RAISE EXCEPTION ''epoch % has observations: an epoch with observations is never deleted'', OLD.id\073
  END IF\073
  IF TG_TABLE_NAME = ''Point'' AND EXISTS (SELECT 1 FROM "Observation" WHERE "pointId" = OLD.id) THEN
    RAISE EXCEPTION ''point % has observations: a point with observations is never deleted'', OLD.id\073
  END IF\073
  RETURN OLD\073
END';

CREATE TRIGGER "Epoch_keep_observed" BEFORE DELETE ON "Epoch" FOR EACH ROW EXECUTE FUNCTION epochal_keep_observed();
CREATE TRIGGER "Point_keep_observed" BEFORE DELETE ON "Point" FOR EACH ROW EXECUTE FUNCTION epochal_keep_observed();

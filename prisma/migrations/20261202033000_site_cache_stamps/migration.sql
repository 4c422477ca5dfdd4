-- Two stamps per site that change whenever the site's points or elements change, by any writer
-- (the application, psql, a later migration): the ingest service keeps a site's point ids and its
-- element definitions in memory and checks them against these stamps in the row it already reads
-- under the site's lock, instead of reading 2,000 point codes and hashing 4,000 element rows per
-- live epoch (about 15 ms of a live epoch's time, test/bench/ingest.ts). A stamp is random, not a
-- counter, so a database rebuilt with the same site ids never repeats one.

-- AlterTable
ALTER TABLE "Site" ADD COLUMN "pointsStamp" UUID NOT NULL DEFAULT gen_random_uuid(),
ADD COLUMN "elementsStamp" UUID NOT NULL DEFAULT gen_random_uuid();

-- One statement-level trigger per event: "changed" holds the new rows (insert, update), "gone" the
-- old ones (update, delete). TG_ARGV[0] names the stamp. The migration runner splits a script at every
-- semicolon (inside quotes and comments too), so each body is an escape string with each semicolon
-- written as its octal code, backslash 073.
CREATE FUNCTION epochal_restamp_sites() RETURNS trigger LANGUAGE plpgsql AS E'
BEGIN
  IF TG_OP = ''INSERT'' THEN
    IF TG_ARGV[0] = ''points'' THEN
      UPDATE "Site" SET "pointsStamp" = gen_random_uuid() WHERE id IN (SELECT "siteId" FROM changed)\073
    ELSE
      UPDATE "Site" SET "elementsStamp" = gen_random_uuid() WHERE id IN (SELECT "siteId" FROM changed)\073
    END IF\073
  ELSIF TG_OP = ''UPDATE'' THEN
    IF TG_ARGV[0] = ''points'' THEN
      UPDATE "Site" SET "pointsStamp" = gen_random_uuid() WHERE id IN (SELECT "siteId" FROM changed UNION SELECT "siteId" FROM gone)\073
    ELSE
      UPDATE "Site" SET "elementsStamp" = gen_random_uuid() WHERE id IN (SELECT "siteId" FROM changed UNION SELECT "siteId" FROM gone)\073
    END IF\073
  ELSE
    IF TG_ARGV[0] = ''points'' THEN
      UPDATE "Site" SET "pointsStamp" = gen_random_uuid() WHERE id IN (SELECT "siteId" FROM gone)\073
    ELSE
      UPDATE "Site" SET "elementsStamp" = gen_random_uuid() WHERE id IN (SELECT "siteId" FROM gone)\073
    END IF\073
  END IF\073
  RETURN NULL\073
END';

-- TRUNCATE has no transition table: every site is restamped.
CREATE FUNCTION epochal_restamp_all_sites() RETURNS trigger LANGUAGE plpgsql AS E'
BEGIN
  IF TG_ARGV[0] = ''points'' THEN
    UPDATE "Site" SET "pointsStamp" = gen_random_uuid()\073
  ELSE
    UPDATE "Site" SET "elementsStamp" = gen_random_uuid()\073
  END IF\073
  RETURN NULL\073
END';

CREATE TRIGGER "Point_restamp_insert" AFTER INSERT ON "Point" REFERENCING NEW TABLE AS changed FOR EACH STATEMENT EXECUTE FUNCTION epochal_restamp_sites('points');
CREATE TRIGGER "Point_restamp_update" AFTER UPDATE ON "Point" REFERENCING OLD TABLE AS gone NEW TABLE AS changed FOR EACH STATEMENT EXECUTE FUNCTION epochal_restamp_sites('points');
CREATE TRIGGER "Point_restamp_delete" AFTER DELETE ON "Point" REFERENCING OLD TABLE AS gone FOR EACH STATEMENT EXECUTE FUNCTION epochal_restamp_sites('points');
CREATE TRIGGER "Point_restamp_truncate" AFTER TRUNCATE ON "Point" FOR EACH STATEMENT EXECUTE FUNCTION epochal_restamp_all_sites('points');
CREATE TRIGGER "Element_restamp_insert" AFTER INSERT ON "Element" REFERENCING NEW TABLE AS changed FOR EACH STATEMENT EXECUTE FUNCTION epochal_restamp_sites('elements');
CREATE TRIGGER "Element_restamp_update" AFTER UPDATE ON "Element" REFERENCING OLD TABLE AS gone NEW TABLE AS changed FOR EACH STATEMENT EXECUTE FUNCTION epochal_restamp_sites('elements');
CREATE TRIGGER "Element_restamp_delete" AFTER DELETE ON "Element" REFERENCING OLD TABLE AS gone FOR EACH STATEMENT EXECUTE FUNCTION epochal_restamp_sites('elements');
CREATE TRIGGER "Element_restamp_truncate" AFTER TRUNCATE ON "Element" FOR EACH STATEMENT EXECUTE FUNCTION epochal_restamp_all_sites('elements');

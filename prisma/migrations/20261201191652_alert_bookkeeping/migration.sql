-- AlterTable
ALTER TABLE "Site" ADD COLUMN     "confidence" DOUBLE PRECISION NOT NULL DEFAULT 0.95;

-- AlterTable
ALTER TABLE "AlertEvent" ADD COLUMN     "createdAt" TIMESTAMPTZ(3) NOT NULL DEFAULT CURRENT_TIMESTAMP;

-- One open alert per rule and element, enforced by the database as well as by the per-site lock.
CREATE UNIQUE INDEX "Alert_open_rule_element" ON "Alert" ("ruleId", "elementId") WHERE "clearedAt" IS NULL;

ALTER TABLE "Site" ADD CONSTRAINT "Site_confidence_check" CHECK ("confidence" > 0 AND "confidence" < 1);

-- DropIndex
DROP INDEX "Observation_pointId_idx";

-- CreateIndex
CREATE INDEX "Observation_pointId_epochId_idx" ON "Observation"("pointId", "epochId");

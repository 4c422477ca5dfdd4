-- DropIndex
DROP INDEX "Observation_epochId_pointId_key";

-- AlterTable
ALTER TABLE "Observation" DROP CONSTRAINT "Observation_pkey",
DROP COLUMN "id",
ADD CONSTRAINT "Observation_pkey" PRIMARY KEY ("epochId", "pointId");

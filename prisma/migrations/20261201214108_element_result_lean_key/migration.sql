-- DropForeignKey
ALTER TABLE "ElementResult" DROP CONSTRAINT "ElementResult_elementId_fkey";

-- DropForeignKey
ALTER TABLE "ElementResult" DROP CONSTRAINT "ElementResult_epochId_fkey";

-- DropIndex
DROP INDEX "ElementResult_elementId_referenceEpochId_time_idx";

-- AlterTable
ALTER TABLE "ElementResult" DROP CONSTRAINT "ElementResult_pkey",
ADD CONSTRAINT "ElementResult_pkey" PRIMARY KEY ("elementId", "referenceEpochId", "time", "epochId");

-- Epochs whose alert evaluation has not run yet. The ingest service adds a row per stored epoch in
-- the transaction that stores it, the evaluation deletes it in the transaction that writes its alerts
-- (under the site's alert lock, so an epoch is evaluated once), and a periodic sweep evaluates rows
-- left by a process that stopped in between. Derived rows, like ElementResult: no foreign keys.

-- CreateTable
CREATE TABLE "AlertBacklog" (
    "epochId" INTEGER NOT NULL,
    "siteId" INTEGER NOT NULL,
    "queuedAt" TIMESTAMPTZ(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "AlertBacklog_pkey" PRIMARY KEY ("epochId")
);

-- CreateIndex
CREATE INDEX "AlertBacklog_queuedAt_idx" ON "AlertBacklog"("queuedAt");

-- CreateSchema
CREATE SCHEMA IF NOT EXISTS "public";

-- CreateTable
CREATE TABLE "Site" (
    "id" SERIAL NOT NULL,
    "slug" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "timeZone" TEXT NOT NULL,
    "frameDescription" TEXT NOT NULL DEFAULT 'Local site grid: x = Easting, y = Northing, z = Height (m)',
    "sigmaHM" DOUBLE PRECISION NOT NULL DEFAULT 0.001,
    "sigmaVM" DOUBLE PRECISION NOT NULL DEFAULT 0.0015,
    "originLatDeg" DOUBLE PRECISION,
    "originLonDeg" DOUBLE PRECISION,
    "originHeightM" DOUBLE PRECISION,
    "refuseUnknownPoints" BOOLEAN NOT NULL DEFAULT false,
    "referenceEpochId" INTEGER,
    "columnMapping" JSONB,
    "createdAt" TIMESTAMPTZ(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "Site_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Point" (
    "id" SERIAL NOT NULL,
    "siteId" INTEGER NOT NULL,
    "code" TEXT NOT NULL,
    "kind" TEXT NOT NULL DEFAULT 'prism',
    "group" TEXT,
    "isReference" BOOLEAN NOT NULL DEFAULT false,
    "sigmaHM" DOUBLE PRECISION,
    "sigmaVM" DOUBLE PRECISION,
    "note" TEXT,
    "createdAt" TIMESTAMPTZ(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "Point_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Epoch" (
    "id" SERIAL NOT NULL,
    "siteId" INTEGER NOT NULL,
    "time" TIMESTAMPTZ(3) NOT NULL,
    "revision" INTEGER NOT NULL DEFAULT 1,
    "isCurrent" BOOLEAN NOT NULL DEFAULT true,
    "source" TEXT NOT NULL DEFAULT 'api',
    "contentHash" TEXT NOT NULL,
    "createdAt" TIMESTAMPTZ(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "createdBy" TEXT,

    CONSTRAINT "Epoch_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Observation" (
    "id" BIGSERIAL NOT NULL,
    "epochId" INTEGER NOT NULL,
    "pointId" INTEGER NOT NULL,
    "east" DOUBLE PRECISION NOT NULL,
    "north" DOUBLE PRECISION NOT NULL,
    "height" DOUBLE PRECISION NOT NULL,
    "sigmaEast" DOUBLE PRECISION NOT NULL,
    "sigmaNorth" DOUBLE PRECISION NOT NULL,
    "sigmaHeight" DOUBLE PRECISION NOT NULL,

    CONSTRAINT "Observation_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "User" (
    "id" SERIAL NOT NULL,
    "email" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "passwordHash" TEXT NOT NULL,
    "isAdmin" BOOLEAN NOT NULL DEFAULT false,
    "disabledAt" TIMESTAMPTZ(3),
    "createdAt" TIMESTAMPTZ(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "User_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Membership" (
    "id" SERIAL NOT NULL,
    "userId" INTEGER NOT NULL,
    "siteId" INTEGER NOT NULL,
    "role" TEXT NOT NULL,

    CONSTRAINT "Membership_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Session" (
    "id" TEXT NOT NULL,
    "userId" INTEGER NOT NULL,
    "expiresAt" TIMESTAMPTZ(3) NOT NULL,
    "createdAt" TIMESTAMPTZ(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "Session_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "SignInAttempt" (
    "id" BIGSERIAL NOT NULL,
    "email" TEXT NOT NULL,
    "address" TEXT NOT NULL,
    "ok" BOOLEAN NOT NULL,
    "at" TIMESTAMPTZ(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "SignInAttempt_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "ApiToken" (
    "id" SERIAL NOT NULL,
    "siteId" INTEGER NOT NULL,
    "scope" TEXT NOT NULL,
    "name" TEXT NOT NULL DEFAULT '',
    "tokenHash" TEXT NOT NULL,
    "prefix" TEXT NOT NULL,
    "createdAt" TIMESTAMPTZ(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "createdBy" TEXT,
    "revokedAt" TIMESTAMPTZ(3),
    "lastUsedAt" TIMESTAMPTZ(3),

    CONSTRAINT "ApiToken_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "AuditEntry" (
    "id" BIGSERIAL NOT NULL,
    "at" TIMESTAMPTZ(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "actor" TEXT NOT NULL,
    "siteId" INTEGER,
    "action" TEXT NOT NULL,
    "entityType" TEXT NOT NULL,
    "entityId" TEXT,
    "before" JSONB,
    "after" JSONB,

    CONSTRAINT "AuditEntry_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Element" (
    "id" SERIAL NOT NULL,
    "siteId" INTEGER NOT NULL,
    "name" TEXT NOT NULL,
    "label" TEXT NOT NULL DEFAULT '',
    "kind" TEXT NOT NULL,
    "mode" TEXT NOT NULL,
    "pointCodes" TEXT[],
    "referenceEpochId" INTEGER,
    "source" TEXT NOT NULL DEFAULT 'manual',
    "minAngleDeg" DOUBLE PRECISION,
    "disabledAt" TIMESTAMPTZ(3),
    "createdAt" TIMESTAMPTZ(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "Element_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "ElementResult" (
    "elementId" INTEGER NOT NULL,
    "epochId" INTEGER NOT NULL,
    "referenceEpochId" INTEGER NOT NULL,
    "time" TIMESTAMPTZ(3) NOT NULL,
    "status" TEXT NOT NULL,
    "greenMax" DOUBLE PRECISION,
    "greenMin" DOUBLE PRECISION,
    "maxShear" DOUBLE PRECISION,
    "arealStrain" DOUBLE PRECISION,
    "rotationDeg" DOUBLE PRECISION,
    "azimuthMaxDeg" DOUBLE PRECISION,
    "engineering" DOUBLE PRECISION,
    "sigmaGreenMax" DOUBLE PRECISION,
    "sigmaGreenMin" DOUBLE PRECISION,
    "sigmaMaxShear" DOUBLE PRECISION,
    "sigmaArealStrain" DOUBLE PRECISION,
    "sigmaEngineering" DOUBLE PRECISION,

    CONSTRAINT "ElementResult_pkey" PRIMARY KEY ("elementId","referenceEpochId","epochId")
);

-- CreateTable
CREATE TABLE "TriggerRule" (
    "id" SERIAL NOT NULL,
    "siteId" INTEGER NOT NULL,
    "name" TEXT NOT NULL,
    "quantity" TEXT NOT NULL,
    "elementIds" INTEGER[],
    "reviewLevel" DOUBLE PRECISION NOT NULL,
    "alertLevel" DOUBLE PRECISION NOT NULL,
    "limitLevel" DOUBLE PRECISION NOT NULL,
    "hysteresis" DOUBLE PRECISION NOT NULL DEFAULT 0,
    "significantOnly" BOOLEAN NOT NULL DEFAULT true,
    "responseReview" TEXT NOT NULL DEFAULT '',
    "responseAlert" TEXT NOT NULL DEFAULT '',
    "responseLimit" TEXT NOT NULL DEFAULT '',
    "preset" TEXT,
    "enabled" BOOLEAN NOT NULL DEFAULT true,
    "createdAt" TIMESTAMPTZ(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "updatedAt" TIMESTAMPTZ(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "TriggerRule_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Alert" (
    "id" SERIAL NOT NULL,
    "siteId" INTEGER NOT NULL,
    "ruleId" INTEGER NOT NULL,
    "elementId" INTEGER NOT NULL,
    "level" TEXT NOT NULL,
    "peakLevel" TEXT NOT NULL,
    "openedAt" TIMESTAMPTZ(3) NOT NULL,
    "openedEpochId" INTEGER NOT NULL,
    "lastEpochId" INTEGER NOT NULL,
    "value" DOUBLE PRECISION NOT NULL,
    "sigma" DOUBLE PRECISION,
    "isSignificant" BOOLEAN NOT NULL DEFAULT true,
    "clearedAt" TIMESTAMPTZ(3),
    "acknowledgedAt" TIMESTAMPTZ(3),
    "acknowledgedBy" TEXT,
    "ackComment" TEXT,

    CONSTRAINT "Alert_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "AlertEvent" (
    "id" BIGSERIAL NOT NULL,
    "alertId" INTEGER NOT NULL,
    "at" TIMESTAMPTZ(3) NOT NULL,
    "kind" TEXT NOT NULL,
    "level" TEXT,
    "value" DOUBLE PRECISION,
    "actor" TEXT,
    "comment" TEXT,

    CONSTRAINT "AlertEvent_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "MailRecipient" (
    "id" SERIAL NOT NULL,
    "siteId" INTEGER NOT NULL,
    "email" TEXT NOT NULL,
    "minLevel" TEXT NOT NULL DEFAULT 'review',
    "digest" BOOLEAN NOT NULL DEFAULT false,

    CONSTRAINT "MailRecipient_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "MailMessage" (
    "id" SERIAL NOT NULL,
    "siteId" INTEGER NOT NULL,
    "alertId" INTEGER,
    "idempotencyKey" TEXT NOT NULL,
    "recipients" TEXT[],
    "subject" TEXT NOT NULL,
    "body" TEXT NOT NULL,
    "status" TEXT NOT NULL DEFAULT 'queued',
    "attempts" INTEGER NOT NULL DEFAULT 0,
    "lastError" TEXT,
    "sentAt" TIMESTAMPTZ(3),
    "createdAt" TIMESTAMPTZ(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "MailMessage_pkey" PRIMARY KEY ("id")
);

-- CreateIndex
CREATE UNIQUE INDEX "Site_slug_key" ON "Site"("slug");

-- CreateIndex
CREATE UNIQUE INDEX "Point_siteId_code_key" ON "Point"("siteId", "code");

-- CreateIndex
CREATE INDEX "Epoch_siteId_isCurrent_time_idx" ON "Epoch"("siteId", "isCurrent", "time");

-- CreateIndex
CREATE UNIQUE INDEX "Epoch_siteId_time_revision_key" ON "Epoch"("siteId", "time", "revision");

-- CreateIndex
CREATE INDEX "Observation_pointId_idx" ON "Observation"("pointId");

-- CreateIndex
CREATE UNIQUE INDEX "Observation_epochId_pointId_key" ON "Observation"("epochId", "pointId");

-- CreateIndex
CREATE UNIQUE INDEX "User_email_key" ON "User"("email");

-- CreateIndex
CREATE UNIQUE INDEX "Membership_userId_siteId_key" ON "Membership"("userId", "siteId");

-- CreateIndex
CREATE INDEX "Session_userId_idx" ON "Session"("userId");

-- CreateIndex
CREATE INDEX "SignInAttempt_email_at_idx" ON "SignInAttempt"("email", "at");

-- CreateIndex
CREATE INDEX "SignInAttempt_address_at_idx" ON "SignInAttempt"("address", "at");

-- CreateIndex
CREATE UNIQUE INDEX "ApiToken_tokenHash_key" ON "ApiToken"("tokenHash");

-- CreateIndex
CREATE INDEX "AuditEntry_siteId_at_idx" ON "AuditEntry"("siteId", "at");

-- CreateIndex
CREATE UNIQUE INDEX "Element_siteId_name_key" ON "Element"("siteId", "name");

-- CreateIndex
CREATE INDEX "ElementResult_elementId_referenceEpochId_time_idx" ON "ElementResult"("elementId", "referenceEpochId", "time");

-- CreateIndex
CREATE INDEX "Alert_siteId_clearedAt_idx" ON "Alert"("siteId", "clearedAt");

-- CreateIndex
CREATE INDEX "AlertEvent_alertId_idx" ON "AlertEvent"("alertId");

-- CreateIndex
CREATE UNIQUE INDEX "MailRecipient_siteId_email_key" ON "MailRecipient"("siteId", "email");

-- CreateIndex
CREATE UNIQUE INDEX "MailMessage_idempotencyKey_key" ON "MailMessage"("idempotencyKey");

-- AddForeignKey
ALTER TABLE "Point" ADD CONSTRAINT "Point_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Epoch" ADD CONSTRAINT "Epoch_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Observation" ADD CONSTRAINT "Observation_epochId_fkey" FOREIGN KEY ("epochId") REFERENCES "Epoch"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Observation" ADD CONSTRAINT "Observation_pointId_fkey" FOREIGN KEY ("pointId") REFERENCES "Point"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Membership" ADD CONSTRAINT "Membership_userId_fkey" FOREIGN KEY ("userId") REFERENCES "User"("id") ON DELETE CASCADE ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Membership" ADD CONSTRAINT "Membership_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site"("id") ON DELETE CASCADE ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Session" ADD CONSTRAINT "Session_userId_fkey" FOREIGN KEY ("userId") REFERENCES "User"("id") ON DELETE CASCADE ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "ApiToken" ADD CONSTRAINT "ApiToken_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site"("id") ON DELETE CASCADE ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Element" ADD CONSTRAINT "Element_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "ElementResult" ADD CONSTRAINT "ElementResult_elementId_fkey" FOREIGN KEY ("elementId") REFERENCES "Element"("id") ON DELETE CASCADE ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "ElementResult" ADD CONSTRAINT "ElementResult_epochId_fkey" FOREIGN KEY ("epochId") REFERENCES "Epoch"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "TriggerRule" ADD CONSTRAINT "TriggerRule_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Alert" ADD CONSTRAINT "Alert_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Alert" ADD CONSTRAINT "Alert_ruleId_fkey" FOREIGN KEY ("ruleId") REFERENCES "TriggerRule"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Alert" ADD CONSTRAINT "Alert_elementId_fkey" FOREIGN KEY ("elementId") REFERENCES "Element"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "AlertEvent" ADD CONSTRAINT "AlertEvent_alertId_fkey" FOREIGN KEY ("alertId") REFERENCES "Alert"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "MailRecipient" ADD CONSTRAINT "MailRecipient_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site"("id") ON DELETE CASCADE ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "MailMessage" ADD CONSTRAINT "MailMessage_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- Constraints Prisma's schema language cannot state. ---------------------------------------

-- No NaN or infinity in stored coordinates, and σ strictly positive. (In PostgreSQL NaN equals
-- NaN and sorts above every number, so it must be excluded by name.)
ALTER TABLE "Observation" ADD CONSTRAINT "Observation_finite_check" CHECK (
  "east"  NOT IN ('NaN'::float8, 'Infinity'::float8, '-Infinity'::float8) AND
  "north" NOT IN ('NaN'::float8, 'Infinity'::float8, '-Infinity'::float8) AND
  "height" NOT IN ('NaN'::float8, 'Infinity'::float8, '-Infinity'::float8) AND
  "sigmaEast" > 0 AND "sigmaEast" < 'Infinity'::float8 AND
  "sigmaNorth" > 0 AND "sigmaNorth" < 'Infinity'::float8 AND
  "sigmaHeight" > 0 AND "sigmaHeight" < 'Infinity'::float8
);
ALTER TABLE "Site" ADD CONSTRAINT "Site_sigma_check" CHECK ("sigmaHM" > 0 AND "sigmaVM" > 0 AND "sigmaHM" < 'Infinity'::float8 AND "sigmaVM" < 'Infinity'::float8);

-- At most one current revision of an epoch per site and time.
CREATE UNIQUE INDEX "Epoch_one_current" ON "Epoch" ("siteId", "time") WHERE "isCurrent";

-- The audit log is append-only: updates and deletes fail with a clear error. (Written without
-- PL/pgSQL because the migration runner splits scripts at every semicolon.)
CREATE FUNCTION epochal_refuse(message text) RETURNS int LANGUAGE sql AS 'SELECT message::int';
CREATE RULE "AuditEntry_no_update" AS ON UPDATE TO "AuditEntry" DO INSTEAD SELECT epochal_refuse('the audit log is append-only: update refused');
CREATE RULE "AuditEntry_no_delete" AS ON DELETE TO "AuditEntry" DO INSTEAD SELECT epochal_refuse('the audit log is append-only: delete refused');

-- CreateTable
CREATE TABLE "ProgramSettings" (
    "id" INTEGER NOT NULL DEFAULT 1,
    "programName" TEXT NOT NULL DEFAULT 'Lapsebank program',
    "analysisParameters" JSONB NOT NULL,
    "updatedAt" TIMESTAMP(3) NOT NULL,

    CONSTRAINT "ProgramSettings_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "School" (
    "id" TEXT NOT NULL,
    "slug" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "School_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "User" (
    "id" TEXT NOT NULL,
    "email" TEXT NOT NULL,
    "displayName" TEXT NOT NULL,
    "passwordHash" TEXT NOT NULL,
    "isProgramAdmin" BOOLEAN NOT NULL DEFAULT false,
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "User_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Membership" (
    "id" TEXT NOT NULL,
    "userId" TEXT NOT NULL,
    "schoolId" TEXT NOT NULL,
    "role" TEXT NOT NULL,
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "Membership_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Session" (
    "id" TEXT NOT NULL,
    "userId" TEXT NOT NULL,
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "expiresAt" TIMESTAMP(3) NOT NULL,
    "lastSeenAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "Session_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Invitation" (
    "id" TEXT NOT NULL,
    "schoolId" TEXT NOT NULL,
    "role" TEXT NOT NULL,
    "tokenHash" TEXT NOT NULL,
    "createdById" TEXT,
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "expiresAt" TIMESTAMP(3) NOT NULL,
    "usedAt" TIMESTAMP(3),

    CONSTRAINT "Invitation_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "ApiToken" (
    "id" TEXT NOT NULL,
    "userId" TEXT NOT NULL,
    "schoolId" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "tokenHash" TEXT NOT NULL,
    "scopes" TEXT NOT NULL,
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "lastUsedAt" TIMESTAMP(3),
    "revokedAt" TIMESTAMP(3),

    CONSTRAINT "ApiToken_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "LoginAttempt" (
    "id" TEXT NOT NULL,
    "key" TEXT NOT NULL,
    "at" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "LoginAttempt_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Site" (
    "id" TEXT NOT NULL,
    "schoolId" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "latitudeDeg" DOUBLE PRECISION NOT NULL,
    "longitudeDeg" DOUBLE PRECISION NOT NULL,
    "elevationM" DOUBLE PRECISION NOT NULL,
    "timeZone" TEXT NOT NULL,
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "Site_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Payload" (
    "id" TEXT NOT NULL,
    "schoolId" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "notes" TEXT NOT NULL DEFAULT '',
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "Payload_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Sensor" (
    "id" TEXT NOT NULL,
    "schoolId" TEXT NOT NULL,
    "serial" TEXT NOT NULL,
    "kind" TEXT NOT NULL,
    "timeConstantS" DOUBLE PRECISION NOT NULL DEFAULT 0,
    "notes" TEXT NOT NULL DEFAULT '',
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "Sensor_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "SensorMount" (
    "id" TEXT NOT NULL,
    "sensorId" TEXT NOT NULL,
    "payloadId" TEXT NOT NULL,
    "fromUtc" TIMESTAMP(3) NOT NULL,
    "toUtc" TIMESTAMP(3),

    CONSTRAINT "SensorMount_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Calibration" (
    "id" TEXT NOT NULL,
    "sensorId" TEXT NOT NULL,
    "spec" JSONB NOT NULL,
    "validFromUtc" TIMESTAMP(3) NOT NULL,
    "validToUtc" TIMESTAMP(3),
    "method" TEXT NOT NULL,
    "referenceReadings" JSONB,
    "notes" TEXT NOT NULL DEFAULT '',
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "Calibration_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "LoggerLayout" (
    "id" TEXT NOT NULL,
    "schoolId" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "spec" JSONB NOT NULL,
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "updatedAt" TIMESTAMP(3) NOT NULL,

    CONSTRAINT "LoggerLayout_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "RawFile" (
    "id" TEXT NOT NULL,
    "schoolId" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "sizeBytes" INTEGER NOT NULL,
    "sha256" TEXT NOT NULL,
    "bytes" BYTEA NOT NULL,
    "uploadedAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "RawFile_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Flight" (
    "id" TEXT NOT NULL,
    "schoolId" TEXT NOT NULL,
    "siteId" TEXT NOT NULL,
    "payloadId" TEXT,
    "sensorId" TEXT,
    "layoutId" TEXT NOT NULL,
    "rawFileId" TEXT NOT NULL,
    "title" TEXT NOT NULL,
    "notes" TEXT NOT NULL DEFAULT '',
    "launchAtUtc" TIMESTAMP(3) NOT NULL,
    "visibility" TEXT NOT NULL DEFAULT 'program',
    "synthetic" BOOLEAN NOT NULL DEFAULT false,
    "createdById" TEXT,
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "updatedAt" TIMESTAMP(3) NOT NULL,
    "deletedAt" TIMESTAMP(3),

    CONSTRAINT "Flight_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "AnalysisRun" (
    "id" TEXT NOT NULL,
    "flightId" TEXT NOT NULL,
    "analysisVersion" TEXT NOT NULL,
    "parameters" JSONB NOT NULL,
    "calibrationId" TEXT,
    "calibrationSpec" JSONB NOT NULL,
    "layoutSpec" JSONB NOT NULL,
    "warnings" JSONB NOT NULL,
    "qcFlags" TEXT NOT NULL DEFAULT '',
    "removedCounts" JSONB NOT NULL,
    "rowCount" INTEGER NOT NULL,
    "skippedRowCount" INTEGER NOT NULL DEFAULT 0,
    "reason" TEXT NOT NULL DEFAULT 'upload',
    "isCurrent" BOOLEAN NOT NULL DEFAULT true,
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "AnalysisRun_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "ProfileLevel" (
    "id" SERIAL NOT NULL,
    "runId" TEXT NOT NULL,
    "phase" TEXT NOT NULL,
    "altitudeM" DOUBLE PRECISION NOT NULL,
    "baseM" DOUBLE PRECISION NOT NULL,
    "topM" DOUBLE PRECISION NOT NULL,
    "sampleCount" INTEGER NOT NULL,
    "temperatureK" DOUBLE PRECISION NOT NULL,
    "temperatureSdK" DOUBLE PRECISION,
    "pressureHpa" DOUBLE PRECISION,
    "relativeHumidityPct" DOUBLE PRECISION,

    CONSTRAINT "ProfileLevel_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "LayerStat" (
    "id" TEXT NOT NULL,
    "runId" TEXT NOT NULL,
    "kind" TEXT NOT NULL,
    "phase" TEXT NOT NULL,
    "baseM" DOUBLE PRECISION NOT NULL,
    "topM" DOUBLE PRECISION NOT NULL,
    "lapseRateKPerKm" DOUBLE PRECISION NOT NULL,
    "lapseRateStdErrKPerKm" DOUBLE PRECISION,
    "rSquared" DOUBLE PRECISION,
    "theilSenLapseRateKPerKm" DOUBLE PRECISION,
    "levelCount" INTEGER NOT NULL,
    "strengthK" DOUBLE PRECISION,
    "meanTemperatureK" DOUBLE PRECISION NOT NULL,
    "meanPressureHpa" DOUBLE PRECISION NOT NULL,
    "pressureFromStandardAtmosphere" BOOLEAN NOT NULL,
    "dryAdiabaticLapseRateKPerKm" DOUBLE PRECISION NOT NULL,
    "moistAdiabaticLapseRateKPerKm" DOUBLE PRECISION NOT NULL,
    "stability" TEXT NOT NULL,

    CONSTRAINT "LayerStat_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "FlightSummary" (
    "id" TEXT NOT NULL,
    "runId" TEXT NOT NULL,
    "flightId" TEXT NOT NULL,
    "isCurrent" BOOLEAN NOT NULL DEFAULT true,
    "schoolId" TEXT NOT NULL,
    "siteId" TEXT NOT NULL,
    "launchAtUtc" TIMESTAMP(3) NOT NULL,
    "year" INTEGER NOT NULL,
    "month" INTEGER NOT NULL,
    "dayOfYear" INTEGER NOT NULL,
    "season" TEXT NOT NULL,
    "seasonName" TEXT NOT NULL,
    "localHour" DOUBLE PRECISION NOT NULL,
    "hoursAfterSunrise" DOUBLE PRECISION,
    "solarElevationDeg" DOUBLE PRECISION NOT NULL,
    "latitudeDeg" DOUBLE PRECISION NOT NULL,
    "launchAltitudeM" DOUBLE PRECISION,
    "burstAltitudeM" DOUBLE PRECISION,
    "maxAltitudeM" DOUBLE PRECISION,
    "minAltitudeM" DOUBLE PRECISION,
    "surfaceTemperatureK" DOUBLE PRECISION,
    "troposphericLapseRateKPerKm" DOUBLE PRECISION,
    "troposphericLapseRateStdErrKPerKm" DOUBLE PRECISION,
    "tropopauseAltitudeM" DOUBLE PRECISION,
    "tropopauseTemperatureK" DOUBLE PRECISION,
    "tropopausePressureHpa" DOUBLE PRECISION,
    "tropopauseStatus" TEXT NOT NULL,
    "secondTropopauseAltitudeM" DOUBLE PRECISION,
    "hasSurfaceInversion" BOOLEAN NOT NULL,
    "surfaceInversionDepthM" DOUBLE PRECISION,
    "surfaceInversionStrengthK" DOUBLE PRECISION,
    "stratosphericLapseRateKPerKm" DOUBLE PRECISION,
    "hasDescent" BOOLEAN NOT NULL,
    "qcFlags" TEXT NOT NULL DEFAULT '',
    "qcFlagged" BOOLEAN NOT NULL DEFAULT false,

    CONSTRAINT "FlightSummary_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "AuditEvent" (
    "id" TEXT NOT NULL,
    "at" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "actorUserId" TEXT,
    "actorLabel" TEXT NOT NULL DEFAULT '',
    "schoolId" TEXT,
    "action" TEXT NOT NULL,
    "entityType" TEXT NOT NULL,
    "entityId" TEXT NOT NULL,
    "details" JSONB,

    CONSTRAINT "AuditEvent_pkey" PRIMARY KEY ("id")
);

-- CreateIndex
CREATE UNIQUE INDEX "School_slug_key" ON "School"("slug");

-- CreateIndex
CREATE UNIQUE INDEX "User_email_key" ON "User"("email");

-- CreateIndex
CREATE INDEX "Membership_schoolId_idx" ON "Membership"("schoolId");

-- CreateIndex
CREATE UNIQUE INDEX "Membership_userId_schoolId_key" ON "Membership"("userId", "schoolId");

-- CreateIndex
CREATE INDEX "Session_userId_idx" ON "Session"("userId");

-- CreateIndex
CREATE UNIQUE INDEX "Invitation_tokenHash_key" ON "Invitation"("tokenHash");

-- CreateIndex
CREATE UNIQUE INDEX "ApiToken_tokenHash_key" ON "ApiToken"("tokenHash");

-- CreateIndex
CREATE INDEX "ApiToken_userId_idx" ON "ApiToken"("userId");

-- CreateIndex
CREATE INDEX "LoginAttempt_key_at_idx" ON "LoginAttempt"("key", "at");

-- CreateIndex
CREATE UNIQUE INDEX "Site_schoolId_name_key" ON "Site"("schoolId", "name");

-- CreateIndex
CREATE UNIQUE INDEX "Payload_schoolId_name_key" ON "Payload"("schoolId", "name");

-- CreateIndex
CREATE UNIQUE INDEX "Sensor_schoolId_serial_key" ON "Sensor"("schoolId", "serial");

-- CreateIndex
CREATE INDEX "SensorMount_sensorId_fromUtc_idx" ON "SensorMount"("sensorId", "fromUtc");

-- CreateIndex
CREATE INDEX "Calibration_sensorId_validFromUtc_idx" ON "Calibration"("sensorId", "validFromUtc");

-- CreateIndex
CREATE UNIQUE INDEX "LoggerLayout_schoolId_name_key" ON "LoggerLayout"("schoolId", "name");

-- CreateIndex
CREATE UNIQUE INDEX "RawFile_schoolId_sha256_key" ON "RawFile"("schoolId", "sha256");

-- CreateIndex
CREATE UNIQUE INDEX "Flight_rawFileId_key" ON "Flight"("rawFileId");

-- CreateIndex
CREATE INDEX "Flight_schoolId_launchAtUtc_idx" ON "Flight"("schoolId", "launchAtUtc");

-- CreateIndex
CREATE INDEX "Flight_siteId_idx" ON "Flight"("siteId");

-- CreateIndex
CREATE INDEX "Flight_launchAtUtc_idx" ON "Flight"("launchAtUtc");

-- CreateIndex
CREATE INDEX "AnalysisRun_flightId_isCurrent_idx" ON "AnalysisRun"("flightId", "isCurrent");

-- CreateIndex
CREATE INDEX "ProfileLevel_runId_phase_altitudeM_idx" ON "ProfileLevel"("runId", "phase", "altitudeM");

-- CreateIndex
CREATE INDEX "LayerStat_runId_idx" ON "LayerStat"("runId");

-- CreateIndex
CREATE UNIQUE INDEX "FlightSummary_runId_key" ON "FlightSummary"("runId");

-- CreateIndex
CREATE INDEX "FlightSummary_isCurrent_season_idx" ON "FlightSummary"("isCurrent", "season");

-- CreateIndex
CREATE INDEX "FlightSummary_isCurrent_month_idx" ON "FlightSummary"("isCurrent", "month");

-- CreateIndex
CREATE INDEX "FlightSummary_isCurrent_siteId_idx" ON "FlightSummary"("isCurrent", "siteId");

-- CreateIndex
CREATE INDEX "FlightSummary_isCurrent_schoolId_idx" ON "FlightSummary"("isCurrent", "schoolId");

-- CreateIndex
CREATE INDEX "FlightSummary_isCurrent_localHour_idx" ON "FlightSummary"("isCurrent", "localHour");

-- CreateIndex
CREATE INDEX "FlightSummary_flightId_idx" ON "FlightSummary"("flightId");

-- CreateIndex
CREATE INDEX "AuditEvent_at_idx" ON "AuditEvent"("at");

-- CreateIndex
CREATE INDEX "AuditEvent_entityType_entityId_idx" ON "AuditEvent"("entityType", "entityId");

-- AddForeignKey
ALTER TABLE "Membership" ADD CONSTRAINT "Membership_userId_fkey" FOREIGN KEY ("userId") REFERENCES "User"("id") ON DELETE CASCADE ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Membership" ADD CONSTRAINT "Membership_schoolId_fkey" FOREIGN KEY ("schoolId") REFERENCES "School"("id") ON DELETE CASCADE ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Session" ADD CONSTRAINT "Session_userId_fkey" FOREIGN KEY ("userId") REFERENCES "User"("id") ON DELETE CASCADE ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Invitation" ADD CONSTRAINT "Invitation_schoolId_fkey" FOREIGN KEY ("schoolId") REFERENCES "School"("id") ON DELETE CASCADE ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "ApiToken" ADD CONSTRAINT "ApiToken_userId_fkey" FOREIGN KEY ("userId") REFERENCES "User"("id") ON DELETE CASCADE ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "ApiToken" ADD CONSTRAINT "ApiToken_schoolId_fkey" FOREIGN KEY ("schoolId") REFERENCES "School"("id") ON DELETE CASCADE ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Site" ADD CONSTRAINT "Site_schoolId_fkey" FOREIGN KEY ("schoolId") REFERENCES "School"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Payload" ADD CONSTRAINT "Payload_schoolId_fkey" FOREIGN KEY ("schoolId") REFERENCES "School"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Sensor" ADD CONSTRAINT "Sensor_schoolId_fkey" FOREIGN KEY ("schoolId") REFERENCES "School"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "SensorMount" ADD CONSTRAINT "SensorMount_sensorId_fkey" FOREIGN KEY ("sensorId") REFERENCES "Sensor"("id") ON DELETE CASCADE ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "SensorMount" ADD CONSTRAINT "SensorMount_payloadId_fkey" FOREIGN KEY ("payloadId") REFERENCES "Payload"("id") ON DELETE CASCADE ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Calibration" ADD CONSTRAINT "Calibration_sensorId_fkey" FOREIGN KEY ("sensorId") REFERENCES "Sensor"("id") ON DELETE CASCADE ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "LoggerLayout" ADD CONSTRAINT "LoggerLayout_schoolId_fkey" FOREIGN KEY ("schoolId") REFERENCES "School"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "RawFile" ADD CONSTRAINT "RawFile_schoolId_fkey" FOREIGN KEY ("schoolId") REFERENCES "School"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Flight" ADD CONSTRAINT "Flight_schoolId_fkey" FOREIGN KEY ("schoolId") REFERENCES "School"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Flight" ADD CONSTRAINT "Flight_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Flight" ADD CONSTRAINT "Flight_payloadId_fkey" FOREIGN KEY ("payloadId") REFERENCES "Payload"("id") ON DELETE SET NULL ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Flight" ADD CONSTRAINT "Flight_sensorId_fkey" FOREIGN KEY ("sensorId") REFERENCES "Sensor"("id") ON DELETE SET NULL ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Flight" ADD CONSTRAINT "Flight_layoutId_fkey" FOREIGN KEY ("layoutId") REFERENCES "LoggerLayout"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Flight" ADD CONSTRAINT "Flight_rawFileId_fkey" FOREIGN KEY ("rawFileId") REFERENCES "RawFile"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "AnalysisRun" ADD CONSTRAINT "AnalysisRun_flightId_fkey" FOREIGN KEY ("flightId") REFERENCES "Flight"("id") ON DELETE CASCADE ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "AnalysisRun" ADD CONSTRAINT "AnalysisRun_calibrationId_fkey" FOREIGN KEY ("calibrationId") REFERENCES "Calibration"("id") ON DELETE SET NULL ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "ProfileLevel" ADD CONSTRAINT "ProfileLevel_runId_fkey" FOREIGN KEY ("runId") REFERENCES "AnalysisRun"("id") ON DELETE CASCADE ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "LayerStat" ADD CONSTRAINT "LayerStat_runId_fkey" FOREIGN KEY ("runId") REFERENCES "AnalysisRun"("id") ON DELETE CASCADE ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "FlightSummary" ADD CONSTRAINT "FlightSummary_runId_fkey" FOREIGN KEY ("runId") REFERENCES "AnalysisRun"("id") ON DELETE CASCADE ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "FlightSummary" ADD CONSTRAINT "FlightSummary_flightId_fkey" FOREIGN KEY ("flightId") REFERENCES "Flight"("id") ON DELETE CASCADE ON UPDATE CASCADE;

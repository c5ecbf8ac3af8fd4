-- CreateTable
CREATE TABLE "ProgramSettings" (
    "id" INTEGER NOT NULL PRIMARY KEY AUTOINCREMENT DEFAULT 1,
    "programName" TEXT NOT NULL DEFAULT 'Lapsebank program',
    "analysisParameters" JSONB NOT NULL,
    "updatedAt" DATETIME NOT NULL
);

-- CreateTable
CREATE TABLE "School" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "slug" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP
);

-- CreateTable
CREATE TABLE "User" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "email" TEXT NOT NULL,
    "displayName" TEXT NOT NULL,
    "passwordHash" TEXT NOT NULL,
    "isProgramAdmin" BOOLEAN NOT NULL DEFAULT false,
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP
);

-- CreateTable
CREATE TABLE "Membership" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "userId" TEXT NOT NULL,
    "schoolId" TEXT NOT NULL,
    "role" TEXT NOT NULL,
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    CONSTRAINT "Membership_userId_fkey" FOREIGN KEY ("userId") REFERENCES "User" ("id") ON DELETE CASCADE ON UPDATE CASCADE,
    CONSTRAINT "Membership_schoolId_fkey" FOREIGN KEY ("schoolId") REFERENCES "School" ("id") ON DELETE CASCADE ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "Session" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "userId" TEXT NOT NULL,
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "expiresAt" DATETIME NOT NULL,
    "lastSeenAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    CONSTRAINT "Session_userId_fkey" FOREIGN KEY ("userId") REFERENCES "User" ("id") ON DELETE CASCADE ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "Invitation" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "schoolId" TEXT NOT NULL,
    "role" TEXT NOT NULL,
    "tokenHash" TEXT NOT NULL,
    "createdById" TEXT,
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "expiresAt" DATETIME NOT NULL,
    "usedAt" DATETIME,
    CONSTRAINT "Invitation_schoolId_fkey" FOREIGN KEY ("schoolId") REFERENCES "School" ("id") ON DELETE CASCADE ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "ApiToken" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "userId" TEXT NOT NULL,
    "schoolId" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "tokenHash" TEXT NOT NULL,
    "scopes" TEXT NOT NULL,
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "lastUsedAt" DATETIME,
    "revokedAt" DATETIME,
    CONSTRAINT "ApiToken_userId_fkey" FOREIGN KEY ("userId") REFERENCES "User" ("id") ON DELETE CASCADE ON UPDATE CASCADE,
    CONSTRAINT "ApiToken_schoolId_fkey" FOREIGN KEY ("schoolId") REFERENCES "School" ("id") ON DELETE CASCADE ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "LoginAttempt" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "key" TEXT NOT NULL,
    "at" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP
);

-- CreateTable
CREATE TABLE "Site" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "schoolId" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "latitudeDeg" REAL NOT NULL,
    "longitudeDeg" REAL NOT NULL,
    "elevationM" REAL NOT NULL,
    "timeZone" TEXT NOT NULL,
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    CONSTRAINT "Site_schoolId_fkey" FOREIGN KEY ("schoolId") REFERENCES "School" ("id") ON DELETE RESTRICT ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "Payload" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "schoolId" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "notes" TEXT NOT NULL DEFAULT '',
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    CONSTRAINT "Payload_schoolId_fkey" FOREIGN KEY ("schoolId") REFERENCES "School" ("id") ON DELETE RESTRICT ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "Sensor" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "schoolId" TEXT NOT NULL,
    "serial" TEXT NOT NULL,
    "kind" TEXT NOT NULL,
    "timeConstantS" REAL NOT NULL DEFAULT 0,
    "notes" TEXT NOT NULL DEFAULT '',
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    CONSTRAINT "Sensor_schoolId_fkey" FOREIGN KEY ("schoolId") REFERENCES "School" ("id") ON DELETE RESTRICT ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "SensorMount" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "sensorId" TEXT NOT NULL,
    "payloadId" TEXT NOT NULL,
    "fromUtc" DATETIME NOT NULL,
    "toUtc" DATETIME,
    CONSTRAINT "SensorMount_sensorId_fkey" FOREIGN KEY ("sensorId") REFERENCES "Sensor" ("id") ON DELETE CASCADE ON UPDATE CASCADE,
    CONSTRAINT "SensorMount_payloadId_fkey" FOREIGN KEY ("payloadId") REFERENCES "Payload" ("id") ON DELETE CASCADE ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "Calibration" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "sensorId" TEXT NOT NULL,
    "spec" JSONB NOT NULL,
    "validFromUtc" DATETIME NOT NULL,
    "validToUtc" DATETIME,
    "method" TEXT NOT NULL,
    "referenceReadings" JSONB,
    "notes" TEXT NOT NULL DEFAULT '',
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    CONSTRAINT "Calibration_sensorId_fkey" FOREIGN KEY ("sensorId") REFERENCES "Sensor" ("id") ON DELETE CASCADE ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "LoggerLayout" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "schoolId" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "spec" JSONB NOT NULL,
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "updatedAt" DATETIME NOT NULL,
    CONSTRAINT "LoggerLayout_schoolId_fkey" FOREIGN KEY ("schoolId") REFERENCES "School" ("id") ON DELETE RESTRICT ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "RawFile" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "schoolId" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "sizeBytes" INTEGER NOT NULL,
    "sha256" TEXT NOT NULL,
    "bytes" BLOB NOT NULL,
    "uploadedAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    CONSTRAINT "RawFile_schoolId_fkey" FOREIGN KEY ("schoolId") REFERENCES "School" ("id") ON DELETE RESTRICT ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "Flight" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "schoolId" TEXT NOT NULL,
    "siteId" TEXT NOT NULL,
    "payloadId" TEXT,
    "sensorId" TEXT,
    "layoutId" TEXT NOT NULL,
    "rawFileId" TEXT NOT NULL,
    "title" TEXT NOT NULL,
    "notes" TEXT NOT NULL DEFAULT '',
    "launchAtUtc" DATETIME NOT NULL,
    "visibility" TEXT NOT NULL DEFAULT 'program',
    "synthetic" BOOLEAN NOT NULL DEFAULT false,
    "createdById" TEXT,
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "updatedAt" DATETIME NOT NULL,
    "deletedAt" DATETIME,
    CONSTRAINT "Flight_schoolId_fkey" FOREIGN KEY ("schoolId") REFERENCES "School" ("id") ON DELETE RESTRICT ON UPDATE CASCADE,
    CONSTRAINT "Flight_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site" ("id") ON DELETE RESTRICT ON UPDATE CASCADE,
    CONSTRAINT "Flight_payloadId_fkey" FOREIGN KEY ("payloadId") REFERENCES "Payload" ("id") ON DELETE SET NULL ON UPDATE CASCADE,
    CONSTRAINT "Flight_sensorId_fkey" FOREIGN KEY ("sensorId") REFERENCES "Sensor" ("id") ON DELETE SET NULL ON UPDATE CASCADE,
    CONSTRAINT "Flight_layoutId_fkey" FOREIGN KEY ("layoutId") REFERENCES "LoggerLayout" ("id") ON DELETE RESTRICT ON UPDATE CASCADE,
    CONSTRAINT "Flight_rawFileId_fkey" FOREIGN KEY ("rawFileId") REFERENCES "RawFile" ("id") ON DELETE RESTRICT ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "AnalysisRun" (
    "id" TEXT NOT NULL PRIMARY KEY,
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
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    CONSTRAINT "AnalysisRun_flightId_fkey" FOREIGN KEY ("flightId") REFERENCES "Flight" ("id") ON DELETE CASCADE ON UPDATE CASCADE,
    CONSTRAINT "AnalysisRun_calibrationId_fkey" FOREIGN KEY ("calibrationId") REFERENCES "Calibration" ("id") ON DELETE SET NULL ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "ProfileLevel" (
    "id" INTEGER NOT NULL PRIMARY KEY AUTOINCREMENT,
    "runId" TEXT NOT NULL,
    "phase" TEXT NOT NULL,
    "altitudeM" REAL NOT NULL,
    "baseM" REAL NOT NULL,
    "topM" REAL NOT NULL,
    "sampleCount" INTEGER NOT NULL,
    "temperatureK" REAL NOT NULL,
    "temperatureSdK" REAL,
    "pressureHpa" REAL,
    "relativeHumidityPct" REAL,
    CONSTRAINT "ProfileLevel_runId_fkey" FOREIGN KEY ("runId") REFERENCES "AnalysisRun" ("id") ON DELETE CASCADE ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "LayerStat" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "runId" TEXT NOT NULL,
    "kind" TEXT NOT NULL,
    "phase" TEXT NOT NULL,
    "baseM" REAL NOT NULL,
    "topM" REAL NOT NULL,
    "lapseRateKPerKm" REAL NOT NULL,
    "lapseRateStdErrKPerKm" REAL,
    "rSquared" REAL,
    "theilSenLapseRateKPerKm" REAL,
    "levelCount" INTEGER NOT NULL,
    "strengthK" REAL,
    "meanTemperatureK" REAL NOT NULL,
    "meanPressureHpa" REAL NOT NULL,
    "pressureFromStandardAtmosphere" BOOLEAN NOT NULL,
    "dryAdiabaticLapseRateKPerKm" REAL NOT NULL,
    "moistAdiabaticLapseRateKPerKm" REAL NOT NULL,
    "stability" TEXT NOT NULL,
    CONSTRAINT "LayerStat_runId_fkey" FOREIGN KEY ("runId") REFERENCES "AnalysisRun" ("id") ON DELETE CASCADE ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "FlightSummary" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "runId" TEXT NOT NULL,
    "flightId" TEXT NOT NULL,
    "isCurrent" BOOLEAN NOT NULL DEFAULT true,
    "schoolId" TEXT NOT NULL,
    "siteId" TEXT NOT NULL,
    "launchAtUtc" DATETIME NOT NULL,
    "year" INTEGER NOT NULL,
    "month" INTEGER NOT NULL,
    "dayOfYear" INTEGER NOT NULL,
    "season" TEXT NOT NULL,
    "seasonName" TEXT NOT NULL,
    "localHour" REAL NOT NULL,
    "hoursAfterSunrise" REAL,
    "solarElevationDeg" REAL NOT NULL,
    "latitudeDeg" REAL NOT NULL,
    "launchAltitudeM" REAL,
    "burstAltitudeM" REAL,
    "maxAltitudeM" REAL,
    "minAltitudeM" REAL,
    "surfaceTemperatureK" REAL,
    "troposphericLapseRateKPerKm" REAL,
    "troposphericLapseRateStdErrKPerKm" REAL,
    "tropopauseAltitudeM" REAL,
    "tropopauseTemperatureK" REAL,
    "tropopausePressureHpa" REAL,
    "tropopauseStatus" TEXT NOT NULL,
    "secondTropopauseAltitudeM" REAL,
    "hasSurfaceInversion" BOOLEAN NOT NULL,
    "surfaceInversionDepthM" REAL,
    "surfaceInversionStrengthK" REAL,
    "stratosphericLapseRateKPerKm" REAL,
    "hasDescent" BOOLEAN NOT NULL,
    "qcFlags" TEXT NOT NULL DEFAULT '',
    "qcFlagged" BOOLEAN NOT NULL DEFAULT false,
    CONSTRAINT "FlightSummary_runId_fkey" FOREIGN KEY ("runId") REFERENCES "AnalysisRun" ("id") ON DELETE CASCADE ON UPDATE CASCADE,
    CONSTRAINT "FlightSummary_flightId_fkey" FOREIGN KEY ("flightId") REFERENCES "Flight" ("id") ON DELETE CASCADE ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "AuditEvent" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "at" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "actorUserId" TEXT,
    "actorLabel" TEXT NOT NULL DEFAULT '',
    "schoolId" TEXT,
    "action" TEXT NOT NULL,
    "entityType" TEXT NOT NULL,
    "entityId" TEXT NOT NULL,
    "details" JSONB
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

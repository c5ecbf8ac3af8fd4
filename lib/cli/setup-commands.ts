/**
 * `schools|sites|payloads|sensors|calibrations|layouts` × `list | show <id> | create`: setup from the
 * command line, so a fresh server can be prepared and `ingest` scripted end to end. `create` takes the
 * same JSON body as `POST /api/v1/setup/<item>` (`--json '<body>'` or `--file body.json`), validates it
 * with the same zod schema through the same create function (audited, actor "cli"), and prints the new
 * id alone on stdout so a script can capture it. A refused body prints the zod messages and exits 1.
 */
import fs from "node:fs";
import { parseArgs } from "node:util";
import { z } from "zod";
import type { Db } from "../db/index.ts";
import {
  calibrationInputSchema, createCalibration, createLayout, createPayload, createSchool, createSensor, createSite,
  layoutInputSchema, OverlappingCalibrationError, payloadInputSchema, schoolInputSchema, sensorInputSchema, siteInputSchema,
  type Actor,
} from "../ingest/index.ts";
import { SetupConflictError } from "../ingest/setup-more.ts";
import type { SetupCommand } from "./setup-help.ts";

export interface CommandOutput {
  log(line: string): void;
  error(line: string): void;
}

const CLI_ACTOR: Actor = { userId: null, label: "cli" };

interface ItemHandlers {
  create(db: Db, body: unknown): Promise<{ id: string }>;
  list(db: Db, filter: { schoolId?: string; sensorId?: string }): Promise<string[]>;
  show(db: Db, id: string): Promise<unknown>;
}

const tab = (...cells: Array<string | number | null>) => cells.map((c) => (c === null ? "" : String(c))).join("\t");

const HANDLERS: Record<SetupCommand, ItemHandlers> = {
  schools: {
    create: (db, body) => createSchool(db, schoolInputSchema.parse(body), CLI_ACTOR),
    list: async (db) => (await db.school.findMany({ orderBy: { name: "asc" } })).map((s) => tab(s.id, s.name, s.slug)),
    show: (db, id) => db.school.findUnique({ where: { id } }),
  },
  sites: {
    create: (db, body) => createSite(db, siteInputSchema.parse(body), CLI_ACTOR),
    list: async (db, { schoolId }) =>
      (await db.site.findMany({ where: schoolId ? { schoolId } : {}, orderBy: [{ schoolId: "asc" }, { name: "asc" }] })).map((s) => tab(s.id, s.name, s.schoolId, s.timeZone)),
    show: (db, id) => db.site.findUnique({ where: { id } }),
  },
  payloads: {
    create: (db, body) => createPayload(db, payloadInputSchema.parse(body), CLI_ACTOR),
    list: async (db, { schoolId }) =>
      (await db.payload.findMany({ where: schoolId ? { schoolId } : {}, orderBy: [{ schoolId: "asc" }, { name: "asc" }] })).map((p) => tab(p.id, p.name, p.schoolId)),
    show: (db, id) => db.payload.findUnique({ where: { id } }),
  },
  sensors: {
    create: (db, body) => createSensor(db, sensorInputSchema.parse(body), CLI_ACTOR),
    list: async (db, { schoolId }) =>
      (await db.sensor.findMany({ where: schoolId ? { schoolId } : {}, orderBy: [{ schoolId: "asc" }, { serial: "asc" }] })).map((s) => tab(s.id, s.serial, s.schoolId, s.kind)),
    show: (db, id) => db.sensor.findUnique({ where: { id }, include: { mounts: { orderBy: { fromUtc: "asc" } } } }),
  },
  calibrations: {
    create: (db, body) => createCalibration(db, calibrationInputSchema.parse(body), CLI_ACTOR),
    list: async (db, { schoolId, sensorId }) =>
      (await db.calibration.findMany({
        where: { ...(sensorId ? { sensorId } : {}), ...(schoolId ? { sensor: { schoolId } } : {}) },
        orderBy: [{ sensorId: "asc" }, { validFromUtc: "asc" }],
      })).map((c) => tab(c.id, c.sensorId, c.method, c.validFromUtc.toISOString(), c.validToUtc?.toISOString() ?? "open")),
    show: (db, id) => db.calibration.findUnique({ where: { id } }),
  },
  layouts: {
    create: (db, body) => createLayout(db, layoutInputSchema.parse(body), CLI_ACTOR),
    list: async (db, { schoolId }) =>
      (await db.loggerLayout.findMany({ where: schoolId ? { schoolId } : {}, orderBy: [{ schoolId: "asc" }, { name: "asc" }] })).map((l) => tab(l.id, l.name, l.schoolId)),
    show: (db, id) => db.loggerLayout.findUnique({ where: { id } }),
  },
};

/** The body of `create`: `--json TEXT` or `--file PATH`, parsed as JSON; a message when neither works. */
function readBody(values: { json?: string; file?: string }): { body: unknown } | { problem: string } {
  if ((values.json === undefined) === (values.file === undefined)) return { problem: "give the body as exactly one of --json '<body>' or --file body.json" };
  let text: string;
  try {
    text = values.json ?? fs.readFileSync(values.file as string, "utf8");
  } catch (error) {
    return { problem: `cannot read ${values.file}: ${(error as Error).message}` };
  }
  try {
    return { body: JSON.parse(text) as unknown };
  } catch (error) {
    return { problem: `the body is not JSON: ${(error as Error).message}` };
  }
}

/** Why a create was refused, in one line per problem; undefined for failures that are not the input's. */
function refusal(error: unknown): string[] | undefined {
  if (error instanceof z.ZodError) return error.issues.map((i) => `${i.path.length ? `${i.path.join(".")}: ` : ""}${i.message}`);
  if (error instanceof OverlappingCalibrationError || error instanceof SetupConflictError) return [error.message];
  if (typeof error === "object" && error !== null && "code" in error) {
    if (error.code === "P2002") return ["That name is already used in this school"];
    if (error.code === "P2003") return ["An id in the body (school, sensor or payload) does not exist"];
  }
  return undefined;
}

/** Runs one setup command; the exit code (0 done, 1 refused or not found, 2 misuse). */
export async function runSetupCommand(db: Db, command: SetupCommand, args: string[], out: CommandOutput = console): Promise<number> {
  const handlers = HANDLERS[command];
  const [sub, ...rest] = args;
  const usage = `usage: ${command} list [--school ID]${command === "calibrations" ? " [--sensor ID]" : ""} | ${command} show <id> | ${command} create (--json '<body>' | --file body.json)`;
  let parsed;
  try {
    parsed = parseArgs({
      args: rest,
      allowPositionals: true,
      options: { school: { type: "string" }, sensor: { type: "string" }, json: { type: "string" }, file: { type: "string" } },
    });
  } catch (error) {
    out.error(`${command}: ${(error as Error).message}\n${usage}`);
    return 2;
  }
  const { values, positionals } = parsed;
  switch (sub) {
    case "list": {
      if (positionals.length) break;
      for (const line of await handlers.list(db, { schoolId: values.school, sensorId: values.sensor })) out.log(line);
      return 0;
    }
    case "show": {
      const [id, ...extra] = positionals;
      if (!id || extra.length) break;
      const item = await handlers.show(db, id);
      if (!item) {
        out.error(`${command} show: no item with id ${id}`);
        return 1;
      }
      out.log(JSON.stringify(item, null, 2));
      return 0;
    }
    case "create": {
      if (positionals.length) break;
      const body = readBody(values);
      if ("problem" in body) {
        out.error(`${command} create: ${body.problem}`);
        return 2;
      }
      try {
        out.log((await handlers.create(db, body.body)).id);
        return 0;
      } catch (error) {
        const lines = refusal(error);
        if (!lines) throw error;
        out.error(`${command} create: refused`);
        for (const line of lines) out.error(`  ${line}`);
        return 1;
      }
    }
  }
  out.error(usage);
  return 2;
}

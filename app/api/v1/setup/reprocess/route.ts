import { z } from "zod";
import { can } from "@/lib/auth/permissions";
import { flightVisibilityWhere } from "@/lib/auth/visibility";
import { getDb } from "@/lib/db";
import { reprocessFlight, selectFlights, type ReprocessOutcome, type ReprocessSelection } from "@/lib/ingest";
import { listFlightsForReprocess } from "@/lib/query/setup-pages";
import { getViewer } from "@/app/_lib/viewer";
import { jsonError, jsonOk, validationError, withErrors } from "../../_lib/respond";
import { refuseVisitors, readJson } from "../_lib/setup-api";
import { currentActor } from "@/app/_lib/viewer";

export const runtime = "nodejs";

const id = z.string().trim().min(1).max(64);
const selectionSchema = z.union([
  z.object({ all: z.literal(true) }),
  z.object({ flightIds: z.array(id).min(1).max(10_000) }),
  z.object({ calibrationId: id }),
  z.object({ layoutId: id }),
  z.object({ siteId: id }),
]);
const reprocessBodySchema = z.object({ selection: selectionSchema, reason: z.string().trim().min(1).max(200).default("re-analysis via API"), force: z.boolean().default(false) });

function selectionFromQuery(params: URLSearchParams): ReprocessSelection | null {
  const calibrationId = params.get("calibration");
  if (calibrationId) return { calibrationId };
  const layoutId = params.get("layout");
  if (layoutId) return { layoutId };
  const siteId = params.get("site");
  if (siteId) return { siteId };
  const flightIds = params.getAll("flight").filter(Boolean);
  if (flightIds.length) return { flightIds };
  if (params.get("all") === "1") return { all: true };
  return null;
}

/** GET /api/v1/setup/reprocess?calibration=ID | layout=ID | site=ID | flight=ID… | all=1: the flights such a re-analysis covers. */
export const GET = withErrors(async (request: Request) => {
  const refused = await refuseVisitors();
  if (refused) return refused;
  const raw = selectionFromQuery(new URL(request.url).searchParams);
  const parsed = selectionSchema.safeParse(raw);
  if (!raw || !parsed.success) return jsonError(400, "invalid-request", "Give one of ?calibration=ID, ?layout=ID, ?site=ID, ?flight=ID (repeatable) or ?all=1");
  const ids = await selectFlights(getDb(), parsed.data);
  return jsonOk({ selection: parsed.data, flights: await listFlightsForReprocess(await getViewer(), ids) });
});

/**
 * POST /api/v1/setup/reprocess {selection, reason, force?}: re-analyses flight by flight and streams
 * progress as NDJSON, one line per flight ({type:"progress", done, total, outcome}), then a summary
 * line. Closing the connection stops after the current flight; posting again resumes (up-to-date
 * flights are skipped). Flights of schools the caller may not change are reported as failed.
 */
export const POST = withErrors(async (request: Request) => {
  const body = await readJson(request, reprocessBodySchema);
  if ("response" in body) return body.response;
  const checked = selectionSchema.safeParse(body.data.selection);
  if (!checked.success) return validationError(checked.error);
  const viewer = await getViewer();
  const db = getDb();
  // Only flights the caller may see are covered; of those, other schools' flights are reported as refused.
  const selected = await selectFlights(db, checked.data);
  const schools = new Map((await db.flight.findMany({ where: { AND: [{ id: { in: selected } }, flightVisibilityWhere(viewer)] }, select: { id: true, schoolId: true } })).map((f) => [f.id, f.schoolId]));
  const ids = selected.filter((flightId) => schools.has(flightId));
  const encoder = new TextEncoder();
  const stream = new ReadableStream<Uint8Array>({
    async start(controller) {
      const send = (line: unknown) => {
        try {
          controller.enqueue(encoder.encode(`${JSON.stringify(line)}\n`));
        } catch {
          // The caller went away; the flight just written is committed, the loop stops at the next check.
        }
      };
      const outcomes: ReprocessOutcome[] = [];
      let interrupted = false;
      send({ type: "start", total: ids.length });
      for (const flightId of ids) {
        if (request.signal.aborted) { interrupted = true; break; }
        const allowed = can(viewer, "setup.edit", { schoolId: schools.get(flightId) ?? null });
        const outcome: ReprocessOutcome = allowed
          ? await reprocessFlight(db, flightId, { reason: body.data.reason, force: body.data.force, actor: await currentActor("api") })
          : { flightId, status: "failed", message: "You may not re-analyse this school's flights" };
        outcomes.push(outcome);
        send({ type: "progress", done: outcomes.length, total: ids.length, outcome });
      }
      const count = (status: ReprocessOutcome["status"]) => outcomes.filter((o) => o.status === status).length;
      send({ type: "summary", total: ids.length, reprocessed: count("reprocessed"), upToDate: count("up-to-date"), failed: count("failed"), interrupted, failures: outcomes.filter((o) => o.status === "failed") });
      controller.close();
    },
  });
  return new Response(stream, { status: 200, headers: { "Content-Type": "application/x-ndjson; charset=utf-8", "Cache-Control": "no-store" } });
});

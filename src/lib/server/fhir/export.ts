/**
 * `GET /api/patients/:id/fhir`: the patient's record as a FHIR R4 Bundle (type collection),
 * streamed: the head, the Patient, an Encounter per bed stay, the target bands as Goals, then the
 * observations page by page, so a 72-hour window of per-second readings never sits in memory as
 * one string. Authorisation and the window are checked before the first byte.
 */
import {
  bloodGasResources,
  bundleEntry,
  bundleHead,
  encounterResource,
  goalResource,
  observationResources,
  patientResource,
  type Resource,
} from '~/lib/fhir/r4.ts';
import type { SessionUser } from '~/lib/server/queries/users.ts';
import { observationsForExport } from '~/lib/server/queries/fhir.ts';
import { ordersOf } from '~/lib/server/queries/orders.ts';
import { bloodGasesOf } from '~/lib/server/queries/blood-gases.ts';
import { staysOf } from '~/lib/server/queries/patients.ts';
import { authorisePatient } from '~/lib/server/charting/patients.ts';

const PAGE = 2000;

export async function fhirExportStream(
  user: SessionUser,
  patientId: number,
  from: Date,
  to: Date,
  base: string,
  now = new Date(),
): Promise<ReadableStream<Uint8Array>> {
  const { patient } = await authorisePatient(user, patientId, 'read');
  const [stays, orders, gases] = await Promise.all([
    staysOf(patientId),
    ordersOf(patientId),
    bloodGasesOf(patientId, 10_000),
  ]);
  const encoder = new TextEncoder();
  const head: Resource[] = [
    patientResource(patient),
    ...stays
      .filter((s) => new Date(s.started_at) <= to && (s.ended_at === null || new Date(s.ended_at) >= from))
      .map((s) => encounterResource(s, patientId)),
    // ordersOf is newest first: each order's replacement is the one before it in that list.
    ...orders
      .filter((o) => new Date(o.ordered_at) <= to)
      .map((o, i, list) => goalResource(o, patientId, i > 0 ? list[i - 1]! : null)),
    // Blood gases in the window (few a day), corrections and entries in error included with their status.
    ...gases
      .filter((g) => new Date(g.sampled_at) >= from && new Date(g.sampled_at) <= to)
      .reverse()
      .flatMap((g) => bloodGasResources(g, patientId)),
  ];
  let first = true;
  let after: { at: Date; id: number } | null = null;
  let done = false;
  const entries = (resources: Resource[]) => {
    let out = '';
    for (const r of resources) {
      out += (first ? '' : ',') + JSON.stringify(bundleEntry(r, base));
      first = false;
    }
    return out;
  };
  return new ReadableStream<Uint8Array>({
    start(controller) {
      controller.enqueue(encoder.encode(bundleHead(`export-${patientId}-${now.getTime()}`, now) + entries(head)));
    },
    // Pulled as the client reads: one page of observations at a time.
    async pull(controller) {
      if (done) return;
      const rows = await observationsForExport(patientId, from, to, after, PAGE);
      if (rows.length) {
        const last = rows[rows.length - 1]!;
        after = { at: last.taken_at, id: last.id };
        controller.enqueue(encoder.encode(entries(rows.flatMap((o) => observationResources(o, patientId)))));
      }
      if (rows.length < PAGE) {
        done = true;
        controller.enqueue(encoder.encode(']}'));
        controller.close();
      }
    },
  });
}

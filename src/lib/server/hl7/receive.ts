/**
 * One HL7 v2 message in, one ACK out. The sender (MSH-3/MSH-4) must be a live gateway and PV1-3 one
 * of its mapped beds; the readings then take the same path as `POST /api/ingest` (`ingestReadings`:
 * validation, idempotency by bed and time, one transaction, escalation checks). Anything refused
 * stores nothing: every check that can refuse runs before the one transaction, and the transaction
 * itself is all or nothing.
 */
import type { Hl7Message } from '@medplum/core';
import { buildAck, readOru, type Hl7Problem } from '~/lib/hl7/oru.ts';
import { BatchRefused, ingestReadings, type IngestResult } from '~/lib/server/devices/ingest.ts';
import { findGatewayBed, liveGatewayBySender, touchGateway } from '~/lib/server/queries/hl7-gateways.ts';

export interface Hl7Outcome {
  ack: Hl7Message;
  code: 'AA' | 'AE' | 'AR';
  result?: IngestResult;
  problem?: Hl7Problem;
}

const refuse = (msg: Hl7Message, problem: Hl7Problem): Hl7Outcome => ({
  ack: buildAck(msg, problem.ack, problem.reason, problem),
  code: problem.ack,
  problem,
});

export async function receiveHl7(msg: Hl7Message, now = new Date()): Promise<Hl7Outcome> {
  const read = readOru(msg);
  if (!read.ok) return refuse(msg, read.problem);
  const oru = read.value;
  const sender = `${oru.application}^${oru.facility}`;
  let gateway: Awaited<ReturnType<typeof liveGatewayBySender>>;
  let bed: Awaited<ReturnType<typeof findGatewayBed>>;
  try {
    gateway = await liveGatewayBySender(oru.application, oru.facility);
    if (!gateway)
      return refuse(msg, {
        ack: 'AR',
        kind: 'unknownKey',
        reason: `Sender ${sender} (MSH-3^MSH-4) is not a live gateway: an admin registers gateways`,
        location: 'MSH^1^3',
      });
    bed = await findGatewayBed(gateway.id, oru.bedName);
    if (!bed)
      return refuse(msg, {
        ack: 'AE',
        kind: 'tableValue',
        reason: `Bed ${oru.bedName} (PV1-3) is not mapped for gateway ${gateway.label}`,
        location: 'PV1^1^3',
      });
    if (!bed.bed_active)
      return refuse(msg, {
        ack: 'AE',
        kind: 'tableValue',
        reason: `Bed ${bed.bed_label} is no longer in use`,
        location: 'PV1^1^3',
      });
    const gatewayId = gateway.id;
    const result = await ingestReadings(
      { bed_id: bed.bed_id, bed_label: bed.bed_label, touch: (trx, at) => touchGateway(trx, gatewayId, at) },
      oru.batch,
      now,
    );
    return { ack: buildAck(msg, 'AA', result.message), code: 'AA', result };
  } catch (err) {
    if (err instanceof BatchRefused) {
      // `readings.3.spo2` → the OBX rows of reading 3, so the gateway's log names its own segments.
      const issue = err.issues[0]!;
      const index = typeof issue.path[1] === 'number' ? issue.path[1] : -1;
      const obx = index >= 0 ? oru.sources[index] : undefined;
      const where = obx ? `OBX ${obx.join(', ')}` : 'message';
      return refuse(msg, {
        ack: 'AE',
        kind: 'dataType',
        reason: `${where}: ${issue.message}; nothing was stored`,
        location: obx ? `OBX^${obx[0]}` : undefined,
      });
    }
    console.error('[hl7] message failed:', (err as Error).message);
    // AR: not about the content; the gateway should send it again later.
    return refuse(msg, { ack: 'AR', kind: 'internal', reason: 'Could not store the message now; send it again' });
  }
}

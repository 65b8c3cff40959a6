/**
 * HL7 gateways: which senders may send ORU^R01 and which of their bed names are which of our beds.
 * Made, mapped, unmapped and revoked by an admin; each change audited in its transaction.
 */
import { toIso } from '~/lib/time/iso.ts';
import { withTransactionRetry } from '~/lib/server/queries/transaction.ts';
import type { z } from 'zod';
import type { GatewayList, GatewayView } from '~/lib/hl7/api-types.ts';
import type { gatewayBedSchema, gatewayCreateSchema } from '~/lib/hl7/gateway-input.ts';
import { ApiError, conflictOnDuplicate } from '~/lib/server/http.ts';
import { revokeCredential } from '~/lib/server/credentials.ts';
import { writeAudit } from '~/lib/server/queries/audit.ts';
import { activeBeds } from '~/lib/server/queries/devices.ts';
import { findBed } from '~/lib/server/queries/patients.ts';
import { listUnits } from '~/lib/server/queries/units.ts';
import {
  deleteGatewayBed,
  insertGateway,
  insertGatewayBed,
  listGatewayBeds,
  listGateways,
  lockGateway,
  lockGatewayBed,
  revokeGateway,
} from '~/lib/server/queries/hl7-gateways.ts';

export function mllpPort(): number | null {
  if (process.env.EBB_MLLP === 'off') return null;
  return Number(process.env.EBB_MLLP_PORT ?? 2575);
}

export async function listAllGateways(): Promise<GatewayList> {
  const [gateways, maps, beds, units] = await Promise.all([
    listGateways(),
    listGatewayBeds(),
    activeBeds(),
    listUnits(),
  ]);
  return {
    gateways: gateways.map(
      (g): GatewayView => ({
        id: g.id,
        label: g.label,
        sendingApplication: g.sending_application,
        sendingFacility: g.sending_facility,
        createdAt: toIso(g.created_at)!,
        createdBy: g.created_by_name,
        lastMessageAt: toIso(g.last_message_at),
        revokedAt: toIso(g.revoked_at),
        revokedBy: g.revoked_by_name,
        revokeReason: g.revoke_reason,
        beds: maps
          .filter((m) => m.gateway_id === g.id)
          .map((m) => ({
            id: m.id,
            bedName: m.bed_name,
            bed: { id: m.bed_id, label: m.bed_label, unitCode: m.unit_code },
            createdAt: toIso(m.created_at)!,
          })),
      }),
    ),
    beds: beds.map((b) => ({ id: b.id, label: b.label, unitCode: b.unit_code, unitName: b.unit_name })),
    mllpPort: mllpPort(),
    timeZone: units[0]?.time_zone ?? 'UTC',
  };
}

async function view(id: number): Promise<GatewayView> {
  return (await listAllGateways()).gateways.find((g) => g.id === id)!;
}

export async function createGateway(
  actorId: number | null,
  input: z.output<typeof gatewayCreateSchema>,
  now = new Date(),
): Promise<GatewayView> {
  const id = await conflictOnDuplicate(
    () =>
      withTransactionRetry(async (trx) => {
        const gid = await insertGateway(trx, {
          label: input.label,
          sending_application: input.sendingApplication,
          sending_facility: input.sendingFacility,
          created_by: actorId,
          created_at: now,
        });
        await writeAudit(trx, {
          actorId,
          action: 'hl7_gateway.create',
          entity: 'hl7_gateway',
          entityId: gid,
          after: input,
          at: now,
        });
        return gid;
      }),
    'sender_taken',
    'A live gateway already sends as this application and facility.',
    { sendingApplication: 'Already used by a live gateway' },
  );
  return view(id);
}

export async function revokeGatewayById(
  actorId: number | null,
  id: number,
  reason: string,
  now = new Date(),
): Promise<GatewayView> {
  await revokeCredential(
    { entity: 'hl7_gateway', noun: 'gateway', shortNoun: 'gateway', lock: lockGateway, revoke: revokeGateway },
    actorId,
    id,
    reason,
    now,
  );
  return view(id);
}

export async function mapGatewayBed(
  actorId: number | null,
  gatewayId: number,
  input: z.output<typeof gatewayBedSchema>,
  now = new Date(),
): Promise<GatewayView> {
  const bed = await findBed(input.bedId);
  if (!bed?.active) throw new ApiError(400, 'invalid_input', 'That bed does not exist.', { bedId: 'No such bed' });
  await conflictOnDuplicate(
    () =>
      withTransactionRetry(async (trx) => {
        const g = await lockGateway(trx, gatewayId);
        if (!g) throw new ApiError(404, 'not_found', 'No gateway with that id.');
        if (g.revoked_at) throw new ApiError(409, 'gateway_revoked', 'This gateway was revoked; make a new one.');
        const mid = await insertGatewayBed(trx, {
          gateway_id: gatewayId,
          bed_name: input.bedName,
          bed_id: bed.id,
          created_by: actorId,
          created_at: now,
        });
        await writeAudit(trx, {
          actorId,
          action: 'hl7_gateway.map_bed',
          entity: 'hl7_gateway',
          entityId: gatewayId,
          after: { mappingId: mid, bedName: input.bedName, bedId: bed.id, bedLabel: bed.label },
          at: now,
        });
      }),
    'bed_name_taken',
    'This gateway already maps that bed name.',
    { bedName: 'Already mapped for this gateway' },
  );
  return view(gatewayId);
}

export async function unmapGatewayBed(
  actorId: number | null,
  gatewayId: number,
  mappingId: number,
  now = new Date(),
): Promise<GatewayView> {
  await withTransactionRetry(async (trx) => {
    const m = await lockGatewayBed(trx, mappingId);
    if (!m || m.gateway_id !== gatewayId) throw new ApiError(404, 'not_found', 'No such bed mapping on this gateway.');
    await deleteGatewayBed(trx, mappingId);
    await writeAudit(trx, {
      actorId,
      action: 'hl7_gateway.unmap_bed',
      entity: 'hl7_gateway',
      entityId: gatewayId,
      before: { mappingId, bedName: m.bed_name, bedId: m.bed_id },
      at: now,
    });
  });
  return view(gatewayId);
}

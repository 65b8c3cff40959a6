import type { Knex } from 'knex';
import { db } from './db.ts';
import type { Conn } from './patients.ts';

export interface GatewayRow {
  id: number;
  label: string;
  sending_application: string;
  sending_facility: string;
  created_by: number | null;
  created_at: Date;
  last_message_at: Date | null;
  revoked_at: Date | null;
  revoked_by: number | null;
  revoke_reason: string | null;
}
export interface GatewayListRow extends GatewayRow {
  created_by_name: string | null;
  revoked_by_name: string | null;
}
export interface GatewayBedRow {
  id: number;
  gateway_id: number;
  bed_name: string;
  bed_id: number;
  bed_label: string;
  bed_active: number | boolean;
  unit_code: string;
  created_at: Date;
}

export async function insertGateway(
  trx: Knex.Transaction,
  row: Pick<GatewayRow, 'label' | 'sending_application' | 'sending_facility' | 'created_by' | 'created_at'>,
): Promise<number> {
  const [id] = await trx('hl7_gateways').insert(row);
  return id;
}

/** Every gateway, live ones first, then newest first. */
export async function listGateways(conn: Conn = db()): Promise<GatewayListRow[]> {
  return conn('hl7_gateways as g')
    .leftJoin('users as cb', 'cb.id', 'g.created_by')
    .leftJoin('users as rb', 'rb.id', 'g.revoked_by')
    .orderByRaw('g.revoked_at IS NOT NULL')
    .orderBy('g.id', 'desc')
    .select(
      'g.id',
      'g.label',
      'g.sending_application',
      'g.sending_facility',
      'g.created_by',
      'g.created_at',
      'g.last_message_at',
      'g.revoked_at',
      'g.revoked_by',
      'g.revoke_reason',
      'cb.name as created_by_name',
      'rb.name as revoked_by_name',
    );
}

export async function listGatewayBeds(conn: Conn = db()): Promise<GatewayBedRow[]> {
  return conn('hl7_gateway_beds as m')
    .join('beds as b', 'b.id', 'm.bed_id')
    .join('units as u', 'u.id', 'b.unit_id')
    .orderBy(['m.gateway_id', 'm.bed_name'])
    .select(
      'm.id',
      'm.gateway_id',
      'm.bed_name',
      'm.bed_id',
      'b.label as bed_label',
      'b.active as bed_active',
      'u.code as unit_code',
      'm.created_at',
    );
}

export async function lockGateway(trx: Knex.Transaction, id: number): Promise<GatewayRow | undefined> {
  return trx<GatewayRow>('hl7_gateways').where({ id }).forUpdate().first();
}

export async function revokeGateway(
  trx: Knex.Transaction,
  id: number,
  fields: { revoked_at: Date; revoked_by: number | null; revoke_reason: string },
): Promise<void> {
  await trx('hl7_gateways').where({ id }).whereNull('revoked_at').update(fields);
}

export async function liveGatewayBySender(
  application: string,
  facility: string,
  conn: Conn = db(),
): Promise<GatewayRow | undefined> {
  return conn<GatewayRow>('hl7_gateways')
    .where({ sending_application: application, sending_facility: facility })
    .whereNull('revoked_at')
    .first();
}

export async function findGatewayBed(
  gatewayId: number,
  bedName: string,
  conn: Conn = db(),
): Promise<GatewayBedRow | undefined> {
  return conn('hl7_gateway_beds as m')
    .join('beds as b', 'b.id', 'm.bed_id')
    .join('units as u', 'u.id', 'b.unit_id')
    .where({ 'm.gateway_id': gatewayId, 'm.bed_name': bedName })
    .first(
      'm.id',
      'm.gateway_id',
      'm.bed_name',
      'm.bed_id',
      'b.label as bed_label',
      'b.active as bed_active',
      'u.code as unit_code',
      'm.created_at',
    );
}

export async function insertGatewayBed(
  trx: Knex.Transaction,
  row: { gateway_id: number; bed_name: string; bed_id: number; created_by: number | null; created_at: Date },
): Promise<number> {
  const [id] = await trx('hl7_gateway_beds').insert(row);
  return id;
}

export async function lockGatewayBed(
  trx: Knex.Transaction,
  id: number,
): Promise<{ id: number; gateway_id: number; bed_name: string; bed_id: number } | undefined> {
  return trx('hl7_gateway_beds').where({ id }).forUpdate().first('id', 'gateway_id', 'bed_name', 'bed_id');
}

/** A mapping is configuration, not a clinical record: removing it deletes the row (audited by the caller). */
export async function deleteGatewayBed(trx: Knex.Transaction, id: number): Promise<void> {
  await trx('hl7_gateway_beds').where({ id }).delete();
}

export async function touchGateway(conn: Conn, id: number, at: Date): Promise<void> {
  await conn('hl7_gateways').where({ id }).update({ last_message_at: at });
}

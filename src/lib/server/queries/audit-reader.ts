/** Reading the audit log with filters; rows about a patient include their obs, escalations, imports and strip checks. */
import type { Knex } from 'knex';
import { db } from './db.ts';

export interface AuditFilter {
  actorId?: number;
  patientId?: number;
  action?: string;
  fromUtc?: Date;
  toUtc?: Date;
}

export interface AuditDbRow {
  id: number;
  at: Date;
  actor_id: number | null;
  actor_name: string | null;
  actor_email: string | null;
  action: string;
  entity: string;
  entity_id: string;
  before: unknown;
  after: unknown;
}

const PATIENT_CHILDREN: [entity: string, table: string][] = [
  ['observation', 'observations'],
  ['escalation', 'escalations'],
  ['observation_import', 'observation_imports'],
  ['pleth_check', 'pleth_checks'],
];

function filtered(f: AuditFilter): Knex.QueryBuilder {
  const q = db()('audit_log as a');
  if (f.actorId) q.where('a.actor_id', f.actorId);
  if (f.action)
    q.where('a.action', f.action.endsWith('.') ? 'like' : '=', f.action.endsWith('.') ? `${f.action}%` : f.action);
  if (f.fromUtc) q.where('a.at', '>=', f.fromUtc);
  if (f.toUtc) q.where('a.at', '<', f.toUtc);
  if (f.patientId !== undefined) {
    const pid = f.patientId;
    q.where((w) => {
      w.where((x) => x.where('a.entity', 'patient').andWhere('a.entity_id', String(pid)));
      for (const [entity, table] of PATIENT_CHILDREN) {
        w.orWhere((x) =>
          x
            .where('a.entity', entity)
            .whereIn('a.entity_id', db()(table).where('patient_id', pid).select(db().raw('CAST(id AS CHAR)'))),
        );
      }
    });
  }
  return q;
}

export async function countAudit(f: AuditFilter): Promise<number> {
  const [{ n }] = await filtered(f).count<{ n: number }[]>({ n: '*' });
  return Number(n);
}

export async function readAudit(f: AuditFilter, offset: number, limit: number): Promise<AuditDbRow[]> {
  const rows = await filtered(f)
    .leftJoin('users as u', 'u.id', 'a.actor_id')
    .orderBy([
      { column: 'a.at', order: 'desc' },
      { column: 'a.id', order: 'desc' },
    ])
    .offset(offset)
    .limit(limit)
    .select(
      'a.id',
      'a.at',
      'a.actor_id',
      'u.name as actor_name',
      'u.email as actor_email',
      'a.action',
      'a.entity',
      'a.entity_id',
      'a.before',
      'a.after',
    );
  return rows.map((r: AuditDbRow) => ({ ...r, before: parseJson(r.before), after: parseJson(r.after) }));
}

function parseJson(v: unknown): unknown {
  if (typeof v !== 'string') return v ?? null;
  try {
    return JSON.parse(v);
  } catch {
    return v;
  }
}

export async function distinctActions(): Promise<string[]> {
  const rows = await db()('audit_log').distinct('action').orderBy('action');
  return rows.map((r: { action: string }) => r.action);
}

export async function patientIdByMrn(mrn: string): Promise<number | undefined> {
  return (await db()('patients').where({ mrn }).first('id'))?.id;
}

export async function zoneOfUnit(code: string | undefined): Promise<{ code: string; time_zone: string } | undefined> {
  const q = db()('units').orderBy('id');
  if (code) q.where({ code });
  return q.first('code', 'time_zone');
}

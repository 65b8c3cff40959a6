/** Audit reader: the filter schema, the row shape, and the CSV of filtered rows. Pure. */
import { z } from 'zod';
import { formatDateTimeSeconds } from '~/lib/time/format.ts';

const day = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Use YYYY-MM-DD')
  .refine((v) => {
    const d = new Date(`${v}T00:00:00Z`);
    return !Number.isNaN(d.getTime()) && d.toISOString().startsWith(v);
  }, 'Not a calendar day');

export const auditQuerySchema = z
  .object({
    actorId: z.coerce.number().int().positive().optional(),
    patient: z.string().trim().min(1).max(20).optional(),
    action: z
      .string()
      .trim()
      .regex(/^[a-z_.]{1,64}$/, 'An action such as user.create, or a prefix such as user.')
      .optional(),
    from: day.optional(),
    to: day.optional(),
    unit: z.string().trim().toUpperCase().max(16).optional(),
    page: z.coerce.number().int().min(1).default(1),
    pageSize: z.coerce.number().int().min(1).max(200).default(50),
    format: z.enum(['json', 'csv']).default('json'),
  })
  .refine((v) => !v.from || !v.to || v.from <= v.to, {
    message: 'The end date is before the start date',
    path: ['to'],
  });
export type AuditQuery = z.infer<typeof auditQuerySchema>;

export interface AuditRowView {
  id: number;
  at: string;
  atLocal: string;
  actorId: number | null;
  actorName: string | null;
  actorEmail: string | null;
  action: string;
  entity: string;
  entityId: string;
  before: unknown;
  after: unknown;
}

export const CSV_LIMIT = 10_000;

/** One CSV cell: quoted when needed, and never read as a formula by a spreadsheet. */
export function csvCell(value: unknown): string {
  let text = value === null || value === undefined ? '' : typeof value === 'string' ? value : JSON.stringify(value);
  if (/^[=+\-@\t\r]/.test(text)) text = `'${text}`;
  return /[",\n\r]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

export function auditCsv(rows: AuditRowView[], timeZone: string): string {
  const head = [`time (${timeZone})`, 'person', 'e-mail', 'action', 'entity', 'entity id', 'before', 'after'];
  const lines = rows.map((r) =>
    [
      formatDateTimeSeconds(r.at, timeZone),
      r.actorName ?? 'system',
      r.actorEmail ?? '',
      r.action,
      r.entity,
      r.entityId,
      r.before,
      r.after,
    ]
      .map(csvCell)
      .join(','),
  );
  return `${[head.map(csvCell).join(','), ...lines].join('\r\n')}\r\n`;
}

/** The keys whose values differ between before and after (shown highlighted side by side). */
export function changedKeys(before: unknown, after: unknown): string[] {
  const b = (before && typeof before === 'object' ? before : {}) as Record<string, unknown>;
  const a = (after && typeof after === 'object' ? after : {}) as Record<string, unknown>;
  return [...new Set([...Object.keys(b), ...Object.keys(a)])].filter(
    (k) => JSON.stringify(b[k]) !== JSON.stringify(a[k]),
  );
}

/** Patient search: MRN, given or family name, bed label, within the given units (latest stay). */
import { db } from './db.ts';

export interface SearchRow {
  id: number;
  mrn: string;
  given_name: string;
  family_name: string;
  stay_ended_at: Date | null;
  bed_label: string;
  unit_code: string;
  unit_name: string;
}

const likeEscape = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);

/** Every token must match the start of one field (MRN, names, bed label), case-insensitively. */
export async function searchPatients(
  unitIds: number[],
  tokens: string[],
  includeDischarged: boolean,
  limit: number,
): Promise<SearchRow[]> {
  if (unitIds.length === 0 || tokens.length === 0) return [];
  const latest = db()('bed_stays').groupBy('patient_id').select('patient_id').max('id as id').as('ls');
  const q = db()('patients as p')
    .join(latest, 'ls.patient_id', 'p.id')
    .join('bed_stays as s', 's.id', 'ls.id')
    .join('beds as b', 'b.id', 's.bed_id')
    .join('units as u', 'u.id', 'b.unit_id')
    .whereIn('b.unit_id', unitIds);
  for (const token of tokens) {
    const like = `${likeEscape(token)}%`;
    q.andWhere((w) =>
      w
        .where('p.mrn', 'like', like)
        .orWhere('p.family_name', 'like', like)
        .orWhere('p.given_name', 'like', like)
        .orWhere('b.label', 'like', like),
    );
  }
  if (!includeDischarged) q.whereNull('s.ended_at');
  return q
    .orderByRaw('s.ended_at IS NOT NULL')
    .orderBy([{ column: 'p.family_name' }, { column: 'p.given_name' }, { column: 'p.id' }])
    .limit(limit)
    .select(
      'p.id',
      'p.mrn',
      'p.given_name',
      'p.family_name',
      's.ended_at as stay_ended_at',
      'b.label as bed_label',
      'u.code as unit_code',
      'u.name as unit_name',
    );
}

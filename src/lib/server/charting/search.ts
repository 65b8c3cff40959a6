/** Finding a patient from the header: only in units the person may see (`unitsVisibleTo`). */
import { patientLabel } from '~/lib/patients/label.ts';
import { searchTokens, type SearchResult } from '~/lib/patients/search.ts';
import { searchPatients } from '~/lib/server/queries/search.ts';
import type { SessionUser } from '~/lib/server/queries/users.ts';
import { unitsVisibleTo } from '~/lib/server/units-visible.ts';

export async function findPatients(
  user: SessionUser,
  q: string,
  includeDischarged: boolean,
  limit: number,
): Promise<SearchResult[]> {
  const units = await unitsVisibleTo(user);
  const rows = await searchPatients(
    units.map((u) => u.id),
    searchTokens(q),
    includeDischarged,
    limit,
  );
  return rows.map((r) => ({
    id: r.id,
    mrn: r.mrn,
    givenName: r.given_name,
    familyName: r.family_name,
    label: patientLabel(r.given_name, r.family_name, r.mrn),
    bedLabel: r.bed_label,
    unitCode: r.unit_code,
    unitName: r.unit_name,
    discharged: r.stay_ended_at !== null,
  }));
}

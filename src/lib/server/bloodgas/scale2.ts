/** What the latest blood gas says about a NEWS2 Scale 2 order, in words kept with the order (the decision stays with the intensivist). */
import type { Knex } from 'knex';
import { formatGas, mmHgToKpa, supportsScale2 } from '~/lib/bloodgas/compute.ts';
import { formatDayTime } from '~/lib/time/format.ts';
import { latestCo2Gas } from '~/lib/server/queries/blood-gases.ts';

export async function scale2Basis(
  patientId: number,
  timeZone: string,
  at: Date,
  conn: Knex | Knex.Transaction,
): Promise<string> {
  const g = await latestCo2Gas(patientId, at, conn);
  if (!g) return 'No blood gas on record supports Scale 2 (no PaCO₂ charted)';
  const paco2 = Number(g.paco2_mmhg);
  const words = `PaCO₂ ${mmHgToKpa(paco2).toFixed(1)} kPa (${formatGas(paco2, 'mmHg')}), pH ${Number(g.ph).toFixed(2)}, ${g.sample_type} gas of ${formatDayTime(g.sampled_at, timeZone)}`;
  return supportsScale2({ sampleType: g.sample_type, paco2MmHg: paco2 })
    ? `Latest gas: ${words}`
    : `The latest blood gas does not show hypercapnia: ${words}`;
}

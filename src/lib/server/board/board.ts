/** GET /api/board: a unit's tiles in a fixed number of queries, whatever the bed count. */
import { buildTile, sortTiles, type BedInput, type BoardTile } from '~/lib/board/tiles.ts';
import { patientLabel } from '~/lib/patients/label.ts';
import { settingsFromRow } from '~/lib/units/settings.ts';
import { ApiError } from '~/lib/server/http.ts';
import { boardBeds } from '~/lib/server/queries/board.ts';
import { lastChartedPerPatient, recentReadings } from '~/lib/server/queries/recent-readings.ts';
import { unitSettingsRow } from '~/lib/server/queries/unit-settings.ts';
import type { SessionUser } from '~/lib/server/queries/users.ts';
import { readingsByPatient, recentWindow, toChartedObs } from '~/lib/server/charting/readings.ts';
import { visibleUnits } from '~/lib/server/charting/patients.ts';
import { openEscalationsByPatient } from './escalation-source.ts';


export interface BoardResponse {
  unit: { code: string; name: string; timeZone: string };
  units: { code: string; name: string }[];
  generatedAt: string;
  settings: { overdueMin: number };
  tiles: BoardTile[];
}

export async function unitBoard(user: SessionUser, unitCode: string | undefined, now = new Date()): Promise<BoardResponse> {
  const units = await visibleUnits(user);
  const unit = unitCode ? units.find((u) => u.code === unitCode) : units.find((u) => u.id === user.unitId) ?? units[0];
  if (!unit) throw new ApiError(unitCode ? 403 : 404, unitCode ? 'forbidden' : 'not_found', unitCode ? `Unit ${unitCode} is not one you can see.` : 'No unit to show.');
  const nowMs = now.getTime();

  const [beds, settingsRow] = await Promise.all([boardBeds(unit.id), unitSettingsRow(unit.id)]);
  const settings = settingsFromRow(settingsRow);
  const patientIds = beds.flatMap((b) => (b.patient_id === null ? [] : [b.patient_id]));
  const [readings, lastCharted, escalations] = await Promise.all([
    recentReadings(patientIds, recentWindow(nowMs)),
    lastChartedPerPatient(patientIds),
    openEscalationsByPatient(patientIds),
  ]);

  const readingsBy = readingsByPatient(readings);
  const lastBy = new Map(lastCharted.map((r) => [r.patient_id, r]));

  const tiles = beds.map((b) => {
    const last = b.patient_id === null ? undefined : lastBy.get(b.patient_id);
    const input: BedInput = {
      bedId: b.bed_id, bedLabel: b.bed_label,
      patient: b.patient_id === null ? null : { id: b.patient_id, label: patientLabel(b.given_name!, b.family_name!, b.mrn!), co2RetentionRisk: Boolean(b.co2_retention_risk) },
      band: b.band_low === null ? null : { low: b.band_low, high: b.band_high!, news2Scale: Number(b.news2_scale) as 1 | 2, orderedAt: new Date(b.ordered_at!).getTime() },
      readings: b.patient_id === null ? [] : readingsBy.get(b.patient_id) ?? [],
      lastCharted: last ? toChartedObs(last) : null,
      escalation: b.patient_id === null ? null : escalations.get(b.patient_id) ?? null,
      nurse: b.nurse_id === null ? null : { id: b.nurse_id, name: b.nurse_name! },
      occultHypoxaemia: b.patient_id === null ? null : escalations.occult.get(b.patient_id) ?? null,
    };
    return buildTile(input, nowMs, settings, unit.time_zone);
  });

  return {
    unit: { code: unit.code, name: unit.name, timeZone: unit.time_zone },
    units: units.map((u) => ({ code: u.code, name: u.name })),
    generatedAt: now.toISOString(),
    settings: { overdueMin: settings.overdueMin },
    tiles: sortTiles(tiles),
  };
}

/** GET /api/board: a unit's tiles in a fixed number of queries, whatever the bed count. */
import type { BoardResponse, BoardTileView } from '~/lib/board/api-types.ts';
import { buildTile, sortTiles, type BedInput, type BoardTile } from '~/lib/board/tiles.ts';
import { BED_MANAGING_ROLES, CHARTING_ROLES, hasRole } from '~/lib/auth/roles.ts';
import { patientLabel } from '~/lib/patients/label.ts';
import { settingsFromRow } from '~/lib/units/settings.ts';
import { boardBeds } from '~/lib/server/queries/board.ts';
import { lastChartedPerPatient, recentReadings } from '~/lib/server/queries/recent-readings.ts';
import { unitSettingsRow } from '~/lib/server/queries/unit-settings.ts';
import type { SessionUser } from '~/lib/server/queries/users.ts';
import { readingsByPatient, recentWindow, toChartedObs } from '~/lib/server/charting/readings.ts';
import { unitToShow } from '~/lib/server/units-visible.ts';
import { escalationPermissions } from '~/lib/server/escalations/access.ts';
import { openEscalationsByPatient } from './escalation-source.ts';

/**
 * A tile offers the claim to whoever manages the unit's beds and to the nurse the bed is assigned to
 * (others claim from the queue); wean prompts are not claimed.
 */
function claimableFromTile(user: SessionUser, tile: BoardTile): boolean {
  const e = tile.escalation;
  if (!e || e.kind === 'wean_prompt' || !escalationPermissions(user, e).claim) return false;
  return hasRole(user.role, BED_MANAGING_ROLES) || (tile.nurse !== null && tile.nurse.id === user.id);
}

export async function unitBoard(
  user: SessionUser,
  unitCode: string | undefined,
  now = new Date(),
): Promise<BoardResponse> {
  const { unit, units } = await unitToShow(user, unitCode);
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
      bedId: b.bed_id,
      bedLabel: b.bed_label,
      patient:
        b.patient_id === null
          ? null
          : {
              id: b.patient_id,
              label: patientLabel(b.given_name!, b.family_name!, b.mrn!),
              co2RetentionRisk: Boolean(b.co2_retention_risk),
            },
      band:
        b.band_low === null
          ? null
          : {
              low: b.band_low,
              high: b.band_high!,
              news2Scale: Number(b.news2_scale) as 1 | 2,
              orderedAt: new Date(b.ordered_at!).getTime(),
            },
      readings: b.patient_id === null ? [] : (readingsBy.get(b.patient_id) ?? []),
      lastCharted: last ? toChartedObs(last) : null,
      escalation: b.patient_id === null ? null : (escalations.get(b.patient_id) ?? null),
      nurse: b.nurse_id === null ? null : { id: b.nurse_id, name: b.nurse_name! },
      occultHypoxaemia: b.patient_id === null ? null : (escalations.occult.get(b.patient_id) ?? null),
    };
    return buildTile(input, nowMs, settings, unit.time_zone);
  });

  return {
    unit: { code: unit.code, name: unit.name, timeZone: unit.time_zone },
    units: units.map((u) => ({ code: u.code, name: u.name })),
    generatedAt: now.toISOString(),
    settings: { overdueMin: settings.overdueMin },
    tiles: sortTiles(tiles).map((t): BoardTileView => ({ ...t, can: { claim: claimableFromTile(user, t) } })),
    can: { assignNurses: hasRole(user.role, BED_MANAGING_ROLES), filterMine: hasRole(user.role, CHARTING_ROLES) },
  };
}

/**
 * "Units this person may see", one function for the board, patient lists and search, escalations,
 * the handover sheet and the pages: the rule is `seesUnit` (src/lib/auth/roles.ts), applied here to
 * the units on record. Unit reports have their own rule (`reportUnits`: administrators included).
 */
import { seesUnit } from '~/lib/auth/roles.ts';
import { ApiError } from '~/lib/server/http.ts';
import { listUnits, type UnitRow } from '~/lib/server/queries/units.ts';
import type { SessionUser } from '~/lib/server/queries/users.ts';

/** Every unit for roles that span units, else the person's own; none for administrators. */
export async function unitsVisibleTo(user: SessionUser): Promise<UnitRow[]> {
  return (await listUnits(null)).filter((u) => seesUnit(user, u.id));
}

/**
 * The unit a one-unit screen (board, handover sheet) shows: the one asked for, else the person's own,
 * else the first they may see. 403 for a unit they may not see, 404 when they may see none.
 */
export async function unitToShow(
  user: SessionUser,
  unitCode: string | undefined,
): Promise<{ unit: UnitRow; units: UnitRow[] }> {
  const units = await unitsVisibleTo(user);
  const unit = unitCode
    ? units.find((u) => u.code === unitCode)
    : (units.find((u) => u.id === user.unitId) ?? units[0]);
  if (!unit)
    throw new ApiError(
      unitCode ? 403 : 404,
      unitCode ? 'forbidden' : 'not_found',
      unitCode ? `Unit ${unitCode} is not one you can see.` : 'No unit to show.',
    );
  return { unit, units };
}

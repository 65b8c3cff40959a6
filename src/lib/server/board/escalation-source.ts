/** The open escalation of each patient, for the board tiles. */
import type { BedInput } from '../../board/tiles.ts';

export async function openEscalationsByPatient(_patientIds: number[]): Promise<Map<number, NonNullable<BedInput['escalation']>>> {
  return new Map();
}

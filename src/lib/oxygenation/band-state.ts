/**
 * Where one SpO₂ reading sits against the band in force, and the words for it: the one source for
 * the board's tiles, the bed chart's marks, the obs record and the band-state run in concerns.ts.
 */
export type BandStateName = 'below' | 'in' | 'above' | 'untrusted' | 'no_reading' | 'no_band';

export interface Band {
  low: number;
  high: number;
}

/** Below, in or above the band (limits inclusive: a reading at the lower limit is in band). */
export function placeInBand(spo2: number, band: Band): 'below' | 'in' | 'above' {
  return spo2 < band.low ? 'below' : spo2 > band.high ? 'above' : 'in';
}

/** The state one reading shows: no reading, untrusted, no band ordered, or its place in the band. */
export function bandStateOf(spo2: number | null, trusted: boolean, band: Band | null): BandStateName {
  if (spo2 === null) return 'no_reading';
  if (!trusted) return 'untrusted';
  if (!band) return 'no_band';
  return placeInBand(spo2, band);
}

export const BAND_STATE_WORDS: Record<BandStateName, string> = {
  below: 'below band',
  in: 'in band',
  above: 'above band',
  untrusted: 'untrusted reading',
  no_band: 'no band ordered',
  no_reading: 'no reading',
};

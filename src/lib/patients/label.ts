/** The minimum-necessary patient label used on boards and in mail: initials + last 3 of the MRN. */
export function patientLabel(givenName: string, familyName: string, mrn: string): string {
  const initial = (s: string) => (s.trim().match(/\p{L}/u)?.[0] ?? '?').toUpperCase();
  return `${initial(givenName)}${initial(familyName)} ·${mrn.slice(-3)}`;
}

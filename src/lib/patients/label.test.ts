import { describe, expect, it } from 'vitest';
import { patientLabel } from './label.ts';

describe('patient label (minimum necessary: initials + last 3 of MRN)', () => {
  it('shows initials and the MRN tail only', () => {
    expect(patientLabel('Maren', 'Quillfeather', 'HG400117')).toBe('MQ ·117');
  });
  it('copes with hyphens, spaces and accents', () => {
    expect(patientLabel(' émile', 'Ardagh-Pike', 'X9')).toBe('ÉA ·X9');
  });
});

import { describe, expect, it } from 'vitest';
import { safeLocalPath } from './redirect.ts';

describe('safeLocalPath', () => {
  it('keeps paths on this site', () => {
    expect(safeLocalPath('/board?unit=L4ICU')).toBe('/board?unit=L4ICU');
    expect(safeLocalPath('/patients/12#chart')).toBe('/patients/12#chart');
  });

  it('refuses every way off the site the probe found, and the usual others', () => {
    for (const bad of [
      '/\\evil.example',
      '/\t/evil.example',
      '/\n/evil.example',
      '//evil.example',
      'https://evil.example',
      'evil.example',
      '/\\/evil.example',
      ' /x',
      '',
      '/x\u0000',
    ]) {
      expect(safeLocalPath(bad), JSON.stringify(bad)).toBe('/');
    }
    expect(safeLocalPath(null)).toBe('/');
  });
});

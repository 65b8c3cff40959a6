import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { ApiError, errorResponse, requireRole } from './http.ts';

describe('one error shape', () => {
  it('turns a zod error into 400 with each field and its reason', async () => {
    const parsed = z
      .object({ spo2: z.number().max(100, 'SpO₂ cannot be over 100 %'), name: z.string() })
      .safeParse({ spo2: 101 });
    const res = errorResponse(parsed.error);
    expect(res.status).toBe(400);
    const body = await res.json();
    expect(body.error.code).toBe('invalid_input');
    expect(body.error.fields.spo2).toBe('SpO₂ cannot be over 100 %');
    expect(body.error.fields.name).toBeDefined();
  });

  it('keeps an ApiError status and code', async () => {
    const res = errorResponse(new ApiError(409, 'stale', 'Someone changed it first'));
    expect(res.status).toBe(409);
    expect(await res.json()).toEqual({ error: { code: 'stale', message: 'Someone changed it first' } });
  });

  it('answers 503 with Retry-After, not 500, when a transaction lost to other writers on every re-run', async () => {
    const res = errorResponse(
      Object.assign(new Error('Deadlock found when trying to get lock'), { errno: 1213, code: 'ER_LOCK_DEADLOCK' }),
    );
    expect(res.status).toBe(503);
    expect(res.headers.get('retry-after')).toBe('1');
    expect((await res.json()).error.code).toBe('database_busy');
  });

  it('says 401 signed out and 403 for the wrong role', () => {
    expect(() => requireRole({ night: false }, ['nurse'])).toThrow(expect.objectContaining({ status: 401 }));
    const locals = {
      night: false,
      user: { id: 1, email: 'a', name: 'a', role: 'outreach' as const, unitId: null, unitCode: null, unitName: null },
    };
    expect(() => requireRole(locals, ['admin'])).toThrow(expect.objectContaining({ status: 403 }));
    expect(requireRole(locals, ['outreach']).id).toBe(1);
  });
});

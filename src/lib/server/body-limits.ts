/** Request-body caps per route, checked by the middleware before anything reads the body. */
import { MAX_TREND_FILE_BYTES } from '~/lib/imports/mapping.ts';
import { MAX_STRIP_BYTES } from '~/lib/pleth-strips/strip-csv.ts';

/** JSON bodies and forms (sign-in included) are small. */
export const DEFAULT_BODY_LIMIT = 64 * 1024;

const LIMITS: { test: RegExp; bytes: number }[] = [
  { test: /^\/api\/patients\/[^/]+\/imports\/(preview|commit)$/, bytes: MAX_TREND_FILE_BYTES },
  { test: /^\/api\/pleth\/analyse$/, bytes: MAX_STRIP_BYTES },
  // The strip travels inside JSON (escaped newlines make it a little larger than the file).
  { test: /^\/api\/pleth\/checks$/, bytes: Math.ceil(MAX_STRIP_BYTES * 1.25) + DEFAULT_BODY_LIMIT },
  // Up to 3,600 readings a batch.
  { test: /^\/api\/ingest$/, bytes: 2 * 1024 * 1024 },
];

export function bodyLimitFor(path: string): number {
  return LIMITS.find((l) => l.test.test(path))?.bytes ?? DEFAULT_BODY_LIMIT;
}

/** Routes that stream their own body with the same cap (uploads), so no Content-Length is needed. */
export function streamsOwnBody(path: string): boolean {
  return /^\/api\/patients\/[^/]+\/imports\/(preview|commit)$|^\/api\/pleth\/analyse$/.test(path);
}

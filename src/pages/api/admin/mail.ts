import { endpoint, json, requireRole } from '~/lib/server/http.ts';
import { mailOverview } from '~/lib/server/mail/admin-mail.ts';

export const GET = endpoint(async ({ locals }) => {
  requireRole(locals, ['admin']);
  return json(await mailOverview());
});

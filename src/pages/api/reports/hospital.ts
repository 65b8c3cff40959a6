import { HOSPITAL_REPORT_ROLES } from '~/lib/auth/roles.ts';
import type { ReportDays } from '~/lib/reports/api-types.ts';
import { reportQuery } from '~/lib/reports/query-input.ts';
import { endpoint, json, parseQuery, requireRole } from '~/lib/server/http.ts';
import { hospitalReport } from '~/lib/server/reports/unit-report.ts';

export const GET = endpoint(async ({ locals, url }) => {
  const user = requireRole(locals, HOSPITAL_REPORT_ROLES);
  const { days } = parseQuery(url, reportQuery);
  return json(await hospitalReport(user, days as ReportDays));
});

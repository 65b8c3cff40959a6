import { REPORT_ROLES } from '~/lib/auth/roles.ts';
import type { ReportDays } from '~/lib/reports/api-types.ts';
import { reportCsv, reportCsvFileName } from '~/lib/reports/csv.ts';
import { reportQuery, unitCodeParam } from '~/lib/reports/query-input.ts';
import { endpoint, parseParams, parseQuery, requireRole } from '~/lib/server/http.ts';
import { unitReport } from '~/lib/server/reports/unit-report.ts';

export const GET = endpoint(async ({ locals, params, url }) => {
  const user = requireRole(locals, REPORT_ROLES);
  const { code } = parseParams(params, unitCodeParam);
  const { days } = parseQuery(url, reportQuery);
  const report = await unitReport(user, code, days as ReportDays);
  return new Response(reportCsv(report), {
    headers: {
      'content-type': 'text/csv; charset=utf-8',
      'content-disposition': `attachment; filename="${reportCsvFileName(report)}"`,
      'cache-control': 'no-store',
    },
  });
});

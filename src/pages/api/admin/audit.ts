import { endpoint, json, parseQuery, requireRole } from '~/lib/server/http.ts';
import { auditCsv, auditQuerySchema } from '~/lib/audit/reader.ts';
import { auditPage, auditRowsForCsv } from '~/lib/server/audit-reader.ts';

export const GET = endpoint(async ({ locals, url }) => {
  requireRole(locals, ['admin']);
  const q = parseQuery(url, auditQuerySchema);
  if (q.format === 'csv') {
    const { rows, timeZone } = await auditRowsForCsv(q);
    return new Response(auditCsv(rows, timeZone), {
      headers: {
        'content-type': 'text/csv; charset=utf-8',
        'content-disposition': 'attachment; filename="ebbwatch-audit.csv"',
        'cache-control': 'no-store',
      },
    });
  }
  return json(await auditPage(q));
});

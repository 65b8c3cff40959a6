/**
 * THE role matrix: every API route × eight callers, with the status each must get.
 * Adding a route under src/pages/api without a row here fails test/integration/role-matrix.test.ts.
 *
 * Callers (columns, in this order):
 *   anon   signed out              nurse  nurse of unit A        xNurse  nurse of unit B
 *   charge charge nurse of unit A  xCharge charge nurse of unit B  int  intensivist
 *   out    outreach                admin  administrator
 * Path placeholders: {patient} a patient in a bed of unit A, {obs} one of their obs, {bed} a bed of
 * unit A, {unit} unit A's code, {missing} an id that does not exist.
 * Bodies: PROBE is a body no route takes (an unknown field), so a caller who passes the role check
 * gets 400 and nothing is stored; writes without a body use {missing} ids (allowed → 404).
 */
export const CALLERS = ['anon', 'nurse', 'xNurse', 'charge', 'xCharge', 'int', 'out', 'admin'] as const;
export type Caller = (typeof CALLERS)[number];

export const PROBE = { matrixProbe: 1 };
export type Body = typeof PROBE | { form: Record<string, string> } | { csv: string } | undefined;

export interface MatrixRow {
  route: string;
  path: string;
  body?: Body;
  expect: string;
}

// route (METHOD + file route)                  path sent                                    body     anon nurse xNurse charge xCharge int out admin
export const ROLE_MATRIX: MatrixRow[] = [
  { route: 'GET /api/health', path: '/api/health', expect: '200 200 200 200 200 200 200 200' },
  { route: 'GET /api/me', path: '/api/me', expect: '401 200 200 200 200 200 200 200' },
  {
    route: 'POST /api/theme',
    path: '/api/theme',
    body: { form: { back: '/' } },
    expect: '303 303 303 303 303 303 303 303',
  },
  { route: 'POST /api/ingest', path: '/api/ingest', body: PROBE, expect: '401 401 401 401 401 401 401 401' },
  { route: 'GET /api/board', path: '/api/board?unit={unit}', expect: '401 200 403 200 403 200 200 403' },
  { route: 'GET /api/nurses', path: '/api/nurses', expect: '401 403 403 200 200 403 403 403' },
  { route: 'GET /api/patients', path: '/api/patients?unit={unit}', expect: '401 200 403 200 403 200 200 403' },
  { route: 'POST /api/patients', path: '/api/patients', body: PROBE, expect: '401 403 403 400 400 403 403 403' },
  { route: 'GET /api/patients/[id]', path: '/api/patients/{patient}', expect: '401 200 403 200 403 200 200 403' },
  {
    route: 'POST /api/patients/[id]/move',
    path: '/api/patients/{patient}/move',
    body: PROBE,
    expect: '401 403 403 400 400 403 403 403',
  },
  {
    route: 'POST /api/patients/[id]/discharge',
    path: '/api/patients/{patient}/discharge',
    body: PROBE,
    expect: '401 403 403 400 400 403 403 403',
  },
  {
    route: 'GET /api/patients/[id]/targets',
    path: '/api/patients/{patient}/targets',
    expect: '401 200 403 200 403 200 200 403',
  },
  {
    route: 'POST /api/patients/[id]/targets',
    path: '/api/patients/{patient}/targets',
    body: PROBE,
    expect: '401 403 403 403 403 400 403 403',
  },
  {
    route: 'GET /api/patients/[id]/observations',
    path: '/api/patients/{patient}/observations',
    expect: '401 200 403 200 403 200 200 403',
  },
  {
    route: 'POST /api/patients/[id]/observations',
    path: '/api/patients/{patient}/observations',
    body: PROBE,
    expect: '401 400 400 400 400 403 403 403',
  },
  {
    route: 'GET /api/patients/[id]/series',
    path: '/api/patients/{patient}/series?hours=6',
    expect: '401 200 403 200 403 200 200 403',
  },
  {
    route: 'GET /api/patients/[id]/blood-gases',
    path: '/api/patients/{patient}/blood-gases',
    expect: '401 200 403 200 403 200 200 403',
  },
  {
    route: 'POST /api/patients/[id]/blood-gases',
    path: '/api/patients/{patient}/blood-gases',
    body: PROBE,
    expect: '401 400 400 400 400 400 403 403',
  },
  {
    route: 'GET /api/patients/[id]/blood-gases/nearest-spo2',
    path: '/api/patients/{patient}/blood-gases/nearest-spo2?at=2026-01-01T00:00:00Z',
    expect: '401 200 403 200 403 200 200 403',
  },
  {
    route: 'POST /api/blood-gases/[id]/correct',
    path: '/api/blood-gases/{missing}/correct',
    body: PROBE,
    expect: '401 400 400 400 400 400 403 403',
  },
  {
    route: 'POST /api/blood-gases/[id]/entered-in-error',
    path: '/api/blood-gases/{missing}/entered-in-error',
    body: PROBE,
    expect: '401 400 400 400 400 400 403 403',
  },
  {
    route: 'GET /api/patients/[id]/imports',
    path: '/api/patients/{patient}/imports',
    expect: '401 200 403 200 403 200 200 403',
  },
  {
    route: 'POST /api/patients/[id]/imports/preview',
    path: '/api/patients/{patient}/imports/preview?time=t&spo2=s&heartRate=h&timeMode=iso&fileName=m.csv',
    body: { csv: 't,s,h\n2026-12-02T10:00:00Z,95,80\n' },
    expect: '401 200 403 200 403 403 403 403',
  },
  // Without fileName the commit is refused before the unit check: this row shows the role check only.
  {
    route: 'POST /api/patients/[id]/imports/commit',
    path: '/api/patients/{patient}/imports/commit?time=t&spo2=s',
    body: { csv: 't,s,h\n2026-12-02T10:00:00Z,95,80\n' },
    expect: '401 400 400 400 400 403 403 403',
  },
  {
    route: 'POST /api/imports/[id]/withdraw',
    path: '/api/imports/{missing}/withdraw',
    body: PROBE,
    expect: '401 400 400 400 400 403 403 403',
  },
  {
    route: 'POST /api/observations/[id]/correct',
    path: '/api/observations/{obs}/correct',
    body: PROBE,
    expect: '401 400 400 400 400 403 403 403',
  },
  {
    route: 'POST /api/observations/[id]/entered-in-error',
    path: '/api/observations/{obs}/entered-in-error',
    body: PROBE,
    expect: '401 400 400 400 400 403 403 403',
  },
  {
    route: 'POST /api/pleth/analyse',
    path: '/api/pleth/analyse',
    body: { csv: 'not,a,strip\n' },
    expect: '401 400 400 400 400 400 400 403',
  },
  {
    route: 'GET /api/pleth/checks',
    path: '/api/pleth/checks?patientId={patient}',
    expect: '401 200 403 200 403 200 200 403',
  },
  {
    route: 'POST /api/pleth/checks',
    path: '/api/pleth/checks',
    body: PROBE,
    expect: '401 400 400 400 400 400 400 403',
  },
  { route: 'GET /api/units/[code]/beds', path: '/api/units/{unit}/beds', expect: '401 200 403 200 200 200 200 403' },
  {
    route: 'GET /api/units/[code]/settings',
    path: '/api/units/{unit}/settings',
    expect: '401 403 403 200 403 403 403 200',
  },
  {
    route: 'PUT /api/units/[code]/settings',
    path: '/api/units/{unit}/settings',
    body: PROBE,
    expect: '401 403 403 403 403 403 403 400',
  },
  {
    route: 'PUT /api/beds/[id]/assignment',
    path: '/api/beds/{bed}/assignment',
    body: PROBE,
    expect: '401 403 403 400 400 403 403 403',
  },
  { route: 'GET /api/escalations', path: '/api/escalations', expect: '401 200 200 200 200 200 200 403' },
  { route: 'GET /api/escalations/[id]', path: '/api/escalations/{missing}', expect: '401 404 404 404 404 404 404 403' },
  {
    route: 'POST /api/escalations/[id]/claim',
    path: '/api/escalations/{missing}/claim',
    expect: '401 404 404 404 404 403 404 403',
  },
  {
    route: 'POST /api/escalations/[id]/close',
    path: '/api/escalations/{missing}/close',
    body: PROBE,
    expect: '401 403 403 400 400 403 400 403',
  },
  { route: 'GET /api/admin/users', path: '/api/admin/users', expect: '401 403 403 403 403 403 403 200' },
  {
    route: 'POST /api/admin/users/[id]/unlock',
    path: '/api/admin/users/{missing}/unlock',
    expect: '401 403 403 403 403 403 403 404',
  },
  { route: 'GET /api/admin/device-keys', path: '/api/admin/device-keys', expect: '401 403 403 403 403 403 403 200' },
  {
    route: 'POST /api/admin/device-keys',
    path: '/api/admin/device-keys',
    body: PROBE,
    expect: '401 403 403 403 403 403 403 400',
  },
  {
    route: 'POST /api/admin/device-keys/[id]/revoke',
    path: '/api/admin/device-keys/{missing}/revoke',
    body: PROBE,
    expect: '401 403 403 403 403 403 403 400',
  },
  { route: 'GET /api/admin/mail', path: '/api/admin/mail', expect: '401 403 403 403 403 403 403 200' },
  // Staff, units and beds, search, audit (issue 13); HL7 gateways and FHIR export (issue 15).
  {
    route: 'POST /api/account/password-link',
    path: '/api/account/password-link',
    body: PROBE,
    expect: '400 400 400 400 400 400 400 400',
  },
  {
    route: 'POST /api/account/password',
    path: '/api/account/password',
    body: PROBE,
    expect: '401 400 400 400 400 400 400 400',
  },
  { route: 'GET /api/patients/search', path: '/api/patients/search?q=zz', expect: '401 200 200 200 200 200 200 403' },
  {
    route: 'GET /api/patients/[id]/fhir',
    path: '/api/patients/{patient}/fhir',
    expect: '401 200 403 200 403 200 200 403',
  },
  { route: 'GET /api/admin/audit', path: '/api/admin/audit', expect: '401 403 403 403 403 403 403 200' },
  { route: 'GET /api/admin/hl7-gateways', path: '/api/admin/hl7-gateways', expect: '401 403 403 403 403 403 403 200' },
  {
    route: 'POST /api/admin/hl7-gateways',
    path: '/api/admin/hl7-gateways',
    body: PROBE,
    expect: '401 403 403 403 403 403 403 400',
  },
  {
    route: 'POST /api/admin/hl7-gateways/[id]/beds',
    path: '/api/admin/hl7-gateways/{missing}/beds',
    body: PROBE,
    expect: '401 403 403 403 403 403 403 400',
  },
  {
    route: 'DELETE /api/admin/hl7-gateways/[id]/beds/[mappingId]',
    path: '/api/admin/hl7-gateways/{missing}/beds/{missing}',
    expect: '401 403 403 403 403 403 403 404',
  },
  {
    route: 'POST /api/admin/hl7-gateways/[id]/revoke',
    path: '/api/admin/hl7-gateways/{missing}/revoke',
    body: PROBE,
    expect: '401 403 403 403 403 403 403 400',
  },
  { route: 'GET /api/admin/units', path: '/api/admin/units', expect: '401 403 403 403 403 403 403 200' },
  { route: 'POST /api/admin/units', path: '/api/admin/units', body: PROBE, expect: '401 403 403 403 403 403 403 400' },
  {
    route: 'PATCH /api/admin/units/[code]',
    path: '/api/admin/units/{unit}',
    body: PROBE,
    expect: '401 403 403 403 403 403 403 400',
  },
  {
    route: 'POST /api/admin/units/[code]/beds',
    path: '/api/admin/units/{unit}/beds',
    body: PROBE,
    expect: '401 403 403 403 403 403 403 400',
  },
  {
    route: 'PUT /api/admin/units/[code]/beds',
    path: '/api/admin/units/{unit}/beds',
    body: PROBE,
    expect: '401 403 403 403 403 403 403 400',
  },
  {
    route: 'PATCH /api/admin/units/[code]/beds/[bedId]',
    path: '/api/admin/units/{unit}/beds/{missing}',
    body: PROBE,
    expect: '401 403 403 403 403 403 403 400',
  },
  {
    route: 'POST /api/admin/units/[code]/beds/[bedId]/retire',
    path: '/api/admin/units/{unit}/beds/{missing}/retire',
    body: PROBE,
    expect: '401 403 403 403 403 403 403 400',
  },
  { route: 'POST /api/admin/users', path: '/api/admin/users', body: PROBE, expect: '401 403 403 403 403 403 403 400' },
  {
    route: 'PATCH /api/admin/users/[id]',
    path: '/api/admin/users/{missing}',
    body: PROBE,
    expect: '401 403 403 403 403 403 403 400',
  },
  {
    route: 'POST /api/admin/users/[id]/deactivate',
    path: '/api/admin/users/{missing}/deactivate',
    body: PROBE,
    expect: '401 403 403 403 403 403 403 400',
  },
  {
    route: 'POST /api/admin/users/[id]/reactivate',
    path: '/api/admin/users/{missing}/reactivate',
    body: PROBE,
    expect: '401 403 403 403 403 403 403 404',
  },
  {
    route: 'POST /api/admin/users/[id]/send-link',
    path: '/api/admin/users/{missing}/send-link',
    body: PROBE,
    expect: '401 403 403 403 403 403 403 404',
  },
  // Handover sheet and unit reports (issue 14).
  { route: 'GET /api/handover', path: '/api/handover?unit={unit}', expect: '401 200 403 200 403 200 200 403' },
  {
    route: 'GET /api/patients/[id]/handover-notes',
    path: '/api/patients/{patient}/handover-notes',
    expect: '401 200 403 200 403 200 200 403',
  },
  {
    route: 'POST /api/patients/[id]/handover-notes',
    path: '/api/patients/{patient}/handover-notes',
    body: PROBE,
    expect: '401 400 400 400 400 403 403 403',
  },
  {
    route: 'GET /api/reports/units/[code]',
    path: '/api/reports/units/{unit}?days=7',
    expect: '401 403 403 200 403 200 403 200',
  },
  {
    route: 'GET /api/reports/units/[code]/csv',
    path: '/api/reports/units/{unit}/csv?days=7',
    expect: '401 403 403 200 403 200 403 200',
  },
  {
    route: 'GET /api/reports/hospital',
    path: '/api/reports/hospital?days=7',
    expect: '401 403 403 403 403 200 403 200',
  },
];

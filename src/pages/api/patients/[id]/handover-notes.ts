import { CHARTING_ROLES, CLINICAL_ROLES } from '~/lib/auth/roles.ts';
import { idParam } from '~/lib/charting/patient-input.ts';
import { handoverNoteInput } from '~/lib/reports/note-input.ts';
import { endpoint, json, parseBody, parseParams, requireRole } from '~/lib/server/http.ts';
import { listHandoverNotes, writeHandoverNote } from '~/lib/server/reports/notes.ts';

export const GET = endpoint(async ({ locals, params }) => {
  const user = requireRole(locals, CLINICAL_ROLES);
  const { id } = parseParams(params, idParam);
  return json({ notes: await listHandoverNotes(user, id) });
});

export const POST = endpoint(async ({ locals, params, request }) => {
  const user = requireRole(locals, CHARTING_ROLES);
  const { id } = parseParams(params, idParam);
  const input = await parseBody(request, handoverNoteInput);
  return json({ note: await writeHandoverNote(user, id, input) }, 201);
});

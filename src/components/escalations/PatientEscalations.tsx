import type { EscalationView } from '~/lib/escalations/api-types.ts';
import { usePolled } from '~/lib/client/use-polled.ts';
import { formatWhen } from '~/lib/time/format.ts';
import { POLL_MS } from '~/components/chart/chart-shared.tsx';

type List = { escalations: EscalationView[] };

/** The patient's open escalations and prompts, above the bed chart; refreshed with it. */
export default function PatientEscalations({ patientId, timeZone }: { patientId: number; timeZone: string }) {
  const acting = usePolled<List>(`/api/escalations?state=open&patient=${patientId}`, POLL_MS);
  const wean = usePolled<List>(`/api/escalations?state=open&patient=${patientId}&kind=wean_prompt`, POLL_MS);
  const list = [...(acting.data?.escalations ?? []), ...(wean.data?.escalations ?? [])];
  if (list.length === 0) return null;
  const time = (iso: string) => formatWhen(iso, timeZone);
  return (
    <section aria-label="Open escalations" className="mb-4 space-y-2" data-testid="patient-escalations">
      {list.map((e) => (
        <p
          key={e.id}
          className={`rounded-md border-l-8 bg-white p-3 shadow-sm dark:bg-ink-900 ${e.kind === 'below_band' ? 'border-coral-500' : e.kind === 'wean_prompt' ? 'border-iris-500' : 'border-ink-400'}`}
        >
          <strong>
            {e.severity === 'urgent' ? 'URGENT · ' : ''}
            {e.kindLabel}
          </strong>
          {' · '}raised {time(e.raisedAt)} · {e.state === 'claimed' ? `claimed by ${e.claimedBy}` : 'not yet claimed'}
          {e.backInBandAt ? ` · back in band since ${time(e.backInBandAt)}` : ''}
          {e.kind !== 'wean_prompt' && (
            <>
              {' '}
              ·{' '}
              <a className="underline" href="/escalations">
                outreach queue
              </a>
            </>
          )}
          {e.kind === 'wean_prompt' && ' — above band on oxygen: consider weaning, per the treating team'}
        </p>
      ))}
    </section>
  );
}

/** The set-password e-mail: who it is for, the link, when it stops working. No patient data. */
import { formatDateTime } from '~/lib/time/format.ts';

export const LINK_HOURS = 24;

export function setPasswordMail(m: {
  name: string;
  link: string;
  expiresAt: Date;
  timeZone: string;
  purpose: 'invite' | 'reset';
  hospital: string | null;
}) {
  const opening =
    m.purpose === 'invite'
      ? `An Ebbwatch account has been made for you${m.hospital ? ` at ${m.hospital}` : ''}.`
      : 'An administrator has asked for your Ebbwatch password to be set again.';
  const until = `${formatDateTime(m.expiresAt, m.timeZone)} (${m.timeZone})`;
  const subject =
    m.purpose === 'invite' ? 'Your Ebbwatch account: choose a password' : 'Ebbwatch: choose a new password';
  const text = [
    `Hello ${m.name},`,
    '',
    opening,
    '',
    `Choose your password here (the link works once, until ${until}):`,
    m.link,
    '',
    'If you did not expect this e-mail, tell your unit administrator and do not open the link.',
  ].join('\n');
  const esc = (s: string) =>
    s.replace(/[&<>"]/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;' })[c]!);
  const html =
    `<p>Hello ${esc(m.name)},</p><p>${esc(opening)}</p><p><a href="${esc(m.link)}">Choose your password</a> — the link works once, until ${esc(until)}.</p>` +
    '<p>If you did not expect this e-mail, tell your unit administrator and do not open the link.</p>';
  return { subject, text, html };
}

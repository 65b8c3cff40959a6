import { useEffect, useState } from 'react';
import { postJson } from '~/lib/client/fetch-json.ts';
import { useForm } from '~/lib/client/use-form.ts';
import type { Strength } from '~/lib/auth/password-policy.ts';

type PolicyModule = typeof import('~/lib/auth/password-policy.ts');
let policyPromise: Promise<PolicyModule> | undefined;
// The common-password list is large: loaded when the form appears, not with every page.
const loadPolicy = () => (policyPromise ??= import('~/lib/auth/password-policy.ts'));

interface Props {
  mode: 'link' | 'account';
  token?: string;
  email?: string;
  required?: boolean;
}

const BAR = ['bg-coral-500', 'bg-coral-400', 'bg-amberline-400', 'bg-glass-500', 'bg-glass-600'];

/** Choose a password: from the e-mailed link (signed out) or on My account. Strength shown while typing. */
export default function PasswordForm({ mode, token, email, required }: Props) {
  const [current, setCurrent] = useState('');
  const [next, setNext] = useState('');
  const [again, setAgain] = useState('');
  const [policy, setPolicy] = useState<PolicyModule | null>(null);
  const { errors, setErrors, alert: message, busy, submit: run } = useForm();
  const [done, setDone] = useState(false);

  useEffect(() => {
    void loadPolicy().then(setPolicy);
  }, []);

  const strength: Strength | null =
    policy && next ? policy.passwordStrength(next, email ? [email, email.split('@')[0]] : []) : null;
  const problem = policy && next ? policy.passwordProblem(next, { email }) : null;

  async function submit(event: React.FormEvent) {
    event.preventDefault();
    setErrors({});
    if (next !== again) {
      setErrors({ again: 'The two passwords differ' });
      return;
    }
    const changed = await run(
      () =>
        mode === 'link'
          ? postJson('/api/account/password-link', { token, password: next })
          : postJson('/api/account/password', { currentPassword: current, newPassword: next }),
      {
        // The link route names the new password `password`; this form calls it `newPassword`.
        onRefused: ({ password, ...rest }) => setErrors(password ? { ...rest, newPassword: password } : rest),
      },
    );
    if (changed !== undefined) setDone(true);
  }

  if (done) {
    return mode === 'link' ? (
      <p role="status" data-testid="password-done" className="panel">
        Your password is set.{' '}
        <a className="font-bold underline" href="/signin">
          Sign in
        </a>{' '}
        with {email ?? 'your e-mail'} and the new password.
      </p>
    ) : (
      <p role="status" data-testid="password-done" className="panel">
        Your password is changed.{' '}
        {required && (
          <a className="font-bold underline" href="/">
            Continue to Ebbwatch
          </a>
        )}
      </p>
    );
  }

  return (
    <form
      className="panel max-w-md space-y-4"
      onSubmit={submit}
      data-testid="password-form"
      data-ready={policy ? 'yes' : 'no'}
      noValidate
    >
      {message && (
        <p
          role="alert"
          className="rounded-md border-l-4 border-coral-500 bg-coral-50 p-2 text-coral-900 dark:bg-coral-900/30 dark:text-coral-100"
        >
          {message}
        </p>
      )}
      {email && <input type="email" name="username" autoComplete="username" value={email} readOnly hidden />}
      {mode === 'account' && (
        <label className="block">
          <span className="mb-1 block font-bold">Current password</span>
          <input
            className="field"
            type="password"
            name="currentPassword"
            autoComplete="current-password"
            value={current}
            onChange={(e) => setCurrent(e.target.value)}
            required
            aria-invalid={Boolean(errors.currentPassword)}
          />
          {errors.currentPassword && (
            <span className="text-sm text-coral-700 dark:text-coral-300">{errors.currentPassword}</span>
          )}
        </label>
      )}
      <div>
        <label className="mb-1 block font-bold" htmlFor="pw-new">
          New password
        </label>
        <p id="pw-hint" className="mb-1 text-sm text-ink-600 dark:text-ink-300">
          At least 12 characters. A few unrelated words make a strong, memorable password; no symbols required.
        </p>
        <input
          id="pw-new"
          className="field"
          type="password"
          name="newPassword"
          autoComplete="new-password"
          value={next}
          onChange={(e) => setNext(e.target.value)}
          required
          aria-describedby="pw-hint pw-strength"
          aria-invalid={Boolean(errors.newPassword)}
        />
        {errors.newPassword && <span className="text-sm text-coral-700 dark:text-coral-300">{errors.newPassword}</span>}
      </div>
      <div id="pw-strength" aria-live="polite" data-testid="password-strength" className="text-sm">
        {strength ? (
          <>
            <div className="flex gap-1" aria-hidden="true">
              {[0, 1, 2, 3, 4].map((i) => (
                <span
                  key={i}
                  className={`h-1.5 flex-1 rounded ${i <= strength.score ? BAR[strength.score] : 'bg-ink-200 dark:bg-ink-700'}`}
                />
              ))}
            </div>
            <p className="mt-1">
              Strength: <strong>{strength.word}</strong>
              {problem ? ` — ${problem}` : strength.hint ? ` — ${strength.hint}` : ''}
            </p>
          </>
        ) : (
          <p className="text-ink-600 dark:text-ink-300">Strength is shown as you type.</p>
        )}
      </div>
      <label className="block">
        <span className="mb-1 block font-bold">New password again</span>
        <input
          className="field"
          type="password"
          name="again"
          autoComplete="new-password"
          value={again}
          onChange={(e) => setAgain(e.target.value)}
          required
          aria-invalid={Boolean(errors.again)}
        />
        {errors.again && <span className="text-sm text-coral-700 dark:text-coral-300">{errors.again}</span>}
      </label>
      <button className="btn-primary" type="submit" disabled={busy || Boolean(problem)}>
        {mode === 'link' ? 'Set password' : 'Change password'}
      </button>
    </form>
  );
}

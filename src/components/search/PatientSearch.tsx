import { useEffect, useRef, useState } from 'react';
import { fetchJson } from '~/lib/client/fetch-json.ts';
import type { SearchResult } from '~/lib/patients/search.ts';

/**
 * The header's patient search: MRN, given or family name, bed label. `/` focuses it from anywhere
 * outside a text field; arrows move through the results and Enter opens the bed chart.
 */
export default function PatientSearch() {
  const input = useRef<HTMLInputElement>(null);
  const [q, setQ] = useState('');
  const [discharged, setDischarged] = useState(false);
  const [results, setResults] = useState<SearchResult[] | null>(null);
  const [active, setActive] = useState(0);
  const [open, setOpen] = useState(false);
  const [problem, setProblem] = useState<string | null>(null);

  useEffect(() => {
    function onKey(e: KeyboardEvent) {
      const t = e.target as HTMLElement | null;
      const typing =
        t && (t.tagName === 'INPUT' || t.tagName === 'TEXTAREA' || t.tagName === 'SELECT' || t.isContentEditable);
      if (e.key === '/' && !typing && !e.ctrlKey && !e.metaKey && !e.altKey) {
        e.preventDefault();
        input.current?.focus();
      }
    }
    document.addEventListener('keydown', onKey);
    return () => document.removeEventListener('keydown', onKey);
  }, []);

  useEffect(() => {
    const text = q.trim();
    if (text.length < 2) {
      setResults(null);
      setProblem(null);
      return;
    }
    let stale = false;
    const timer = setTimeout(async () => {
      try {
        const data = await fetchJson<{ results: SearchResult[] }>(
          `/api/patients/search?q=${encodeURIComponent(text)}&discharged=${discharged ? 'include' : 'exclude'}`,
        );
        if (!stale) {
          setResults(data.results);
          setActive(0);
          setProblem(null);
          setOpen(true);
        }
      } catch (err) {
        if (!stale) setProblem((err as Error).message);
      }
    }, 200);
    return () => {
      stale = true;
      clearTimeout(timer);
    };
  }, [q, discharged]);

  const go = (r: SearchResult) => {
    window.location.href = `/patients/${r.id}`;
  };

  function onKeyDown(e: React.KeyboardEvent) {
    if (!results || results.length === 0) return;
    if (e.key === 'ArrowDown') {
      e.preventDefault();
      setOpen(true);
      setActive((i) => (i + 1) % results.length);
    } else if (e.key === 'ArrowUp') {
      e.preventDefault();
      setActive((i) => (i - 1 + results.length) % results.length);
    } else if (e.key === 'Enter') {
      e.preventDefault();
      go(results[active]);
    } else if (e.key === 'Escape') {
      setOpen(false);
    }
  }

  const showList = open && results !== null;
  return (
    <div className="relative" data-testid="patient-search">
      <label className="sr-only" htmlFor="patient-search-input">
        Find a patient (MRN, name or bed; press / to focus)
      </label>
      <input
        ref={input}
        id="patient-search-input"
        type="search"
        autoComplete="off"
        placeholder="Find patient  /"
        className="w-44 rounded border border-ink-600 bg-ink-800 px-2 py-0.5 text-sm text-ink-50 placeholder:text-ink-300 focus:w-64 dark:bg-black/40"
        role="combobox"
        aria-expanded={showList}
        aria-controls="patient-search-list"
        aria-autocomplete="list"
        aria-activedescendant={showList && results!.length ? `patient-search-${results![active]?.id}` : undefined}
        value={q}
        onChange={(e) => {
          setQ(e.target.value);
          setOpen(true);
        }}
        onKeyDown={onKeyDown}
        onFocus={() => setOpen(true)}
        onBlur={() => setTimeout(() => setOpen(false), 150)}
      />
      {showList && (
        <div className="absolute left-0 z-30 mt-1 w-[min(20rem,calc(100vw-2rem))] rounded-md sm:left-auto sm:right-0 border border-ink-200 bg-white p-1 text-ink-900 shadow-lg dark:border-ink-700 dark:bg-ink-900 dark:text-ink-100">
          <label className="flex items-center gap-2 px-2 py-1 text-xs">
            <input
              type="checkbox"
              checked={discharged}
              onChange={(e) => setDischarged(e.target.checked)}
              onMouseDown={(e) => e.preventDefault()}
            />{' '}
            include discharged
          </label>
          {/* biome-ignore lint/a11y/noNoninteractiveElementToInteractiveRole: the combobox pattern (WAI-ARIA APG): focus stays in the input, aria-activedescendant names the option */}
          <ul id="patient-search-list" role="listbox" aria-label="Patients found">
            {results!.length === 0 && <li className="px-2 py-1 text-sm">No patient found in your units.</li>}
            {results!.map((r, i) => (
              // biome-ignore lint/a11y/useFocusableInteractive: options of a combobox are reached through aria-activedescendant, not focus
              <li
                key={r.id}
                id={`patient-search-${r.id}`}
                // biome-ignore lint/a11y/noNoninteractiveElementToInteractiveRole: the combobox pattern (WAI-ARIA APG): focus stays in the input
                role="option"
                aria-selected={i === active}
                className={`cursor-pointer rounded px-2 py-1 text-sm ${i === active ? 'bg-glass-100 dark:bg-glass-900/60' : ''}`}
                onMouseDown={(e) => {
                  e.preventDefault();
                  go(r);
                }}
                onMouseEnter={() => setActive(i)}
              >
                <span className="font-bold">
                  {r.familyName}, {r.givenName}
                </span>{' '}
                · MRN {r.mrn}
                <span className="block text-xs text-ink-600 dark:text-ink-300">
                  {r.discharged
                    ? `discharged · last bed ${r.bedLabel}, ${r.unitName}`
                    : `${r.bedLabel} · ${r.unitName}`}
                </span>
              </li>
            ))}
          </ul>
        </div>
      )}
      {problem && (
        <span role="alert" className="sr-only">
          {problem}
        </span>
      )}
    </div>
  );
}

'use client';

import { useEffect, useMemo, useState } from 'react';
import { Button } from '@/components/ui/button';
import { Card, CardBody, CardHeader } from '@/components/ui/card';
import { Field } from '@/components/ui/field';
import { Input, Select } from '@/components/ui/input';
import { BENCH_QUANTITIES, DEFAULT_BENCH_TOLERANCE } from '@/lib/calc/bench';
import type { ProjectDetail, WatcherOption } from '@/lib/projects/service';
import { ApiRequestError, fetchJson } from '@/lib/hooks/fetch-json';
import { benchTolerancesSchema, type BenchToleranceKey } from '@/lib/validation/project';

// The form holds percent as typed; the API and the database hold fractions (0.05 = ±5 %).
type Texts = Partial<Record<BenchToleranceKey, string>>;
type Errors = Partial<Record<BenchToleranceKey, string>>;
type Conflict = { message: string; current: ProjectDetail };

// Shown beside the label: where a quantity applies or what it is compared with.
const WHEN: Partial<Record<BenchToleranceKey, string>> = {
  screenVoltage: 'pentodes',
  screenDissipation: 'pentodes',
  heaterVoltage: 'of nominal',
};
const DEFAULT_PERCENT = DEFAULT_BENCH_TOLERANCE * 100;

/** 0.075 → "7.5" without floating-point tails (0.07 * 100 = 7.000000000000001). */
function percentText(fraction: number) {
  return String(Number((fraction * 100).toFixed(4)));
}

function toTexts(tolerances: ProjectDetail['benchTolerances']): Texts {
  const out: Texts = {};
  for (const { key } of BENCH_QUANTITIES) {
    const v = tolerances?.[key];
    if (typeof v === 'number') out[key] = percentText(v);
  }
  return out;
}

/** Percent texts → fractions, checked with the schema the route parses the body with; empty fields are left out (default). */
function toFractions(texts: Texts): { value: Partial<Record<BenchToleranceKey, number>> | null; errors: Errors } {
  const raw: Record<string, number> = {};
  for (const { key } of BENCH_QUANTITIES) {
    const t = texts[key]?.trim().replace(/\s*%$/, '').replace(',', '.');
    if (!t) continue;
    raw[key] = t === '' || !/^[-+]?(\d+\.?\d*|\.\d+)(e[-+]?\d+)?$/i.test(t) ? Number.NaN : Number(t) / 100;
  }
  const parsed = benchTolerancesSchema.safeParse(raw);
  if (parsed.success) return { value: parsed.data, errors: {} };
  const errors: Errors = {};
  for (const issue of parsed.error.issues) {
    const key = issue.path[0] as BenchToleranceKey | undefined;
    if (key && !errors[key]) errors[key] = issue.message;
  }
  return { value: null, errors };
}

const sameTolerances = (a: Record<string, number | undefined>, b: Record<string, number | undefined>) =>
  BENCH_QUANTITIES.every(({ key }) => (a[key] ?? null) === (b[key] ?? null));
const sameIds = (a: number[], b: number[]) => a.length === b.length && [...a].sort().every((v, i) => v === [...b].sort()[i]);

export function ReviewSettings({
  project,
  editable,
  users,
  onSaved,
}: {
  project: ProjectDetail;
  editable: boolean;
  /** active users to pick watchers from (only needed when editable) */
  users: WatcherOption[];
  onSaved: (p: ProjectDetail) => void;
}) {
  const [texts, setTexts] = useState<Texts>(() => toTexts(project.benchTolerances));
  const [watchers, setWatchers] = useState<number[]>(() => project.watchers.map((w) => w.id));
  const [errors, setErrors] = useState<Errors>({});
  const [error, setError] = useState<string | null>(null);
  const [saved, setSaved] = useState(false);
  const [saving, setSaving] = useState(false);
  const [conflict, setConflict] = useState<Conflict | null>(null);
  const [pick, setPick] = useState('');

  const typed = useMemo(() => toFractions(texts), [texts]);
  const tolerancesDirty = typed.value ? !sameTolerances(typed.value, project.benchTolerances) : true;
  const watchersDirty = !sameIds(watchers, project.watchers.map((w) => w.id));
  const dirty = tolerancesDirty || watchersDirty;

  // Another card on the page saved the project (new version): follow it unless something is typed here.
  const [seenVersion, setSeenVersion] = useState(project.version);
  useEffect(() => {
    if (project.version === seenVersion) return;
    setSeenVersion(project.version);
    if (!conflict && !saving && (!dirty || !editable)) {
      setTexts(toTexts(project.benchTolerances));
      setWatchers(project.watchers.map((w) => w.id));
    }
  }, [project, seenVersion, conflict, saving, dirty, editable]);

  const names = useMemo(() => {
    const m = new Map<number, string>();
    for (const u of users) m.set(u.id, u.displayName);
    for (const w of project.watchers) m.set(w.id, w.displayName);
    if (conflict) for (const w of conflict.current.watchers) m.set(w.id, w.displayName);
    return m;
  }, [users, project.watchers, conflict]);
  const roleOf = useMemo(() => new Map(users.map((u) => [u.id, u.role])), [users]);

  const setText = (key: BenchToleranceKey, v: string) => {
    setSaved(false);
    setTexts((t) => ({ ...t, [key]: v }));
    setErrors((e) => ({ ...e, [key]: undefined }));
  };

  const save = async (version: number) => {
    setError(null);
    setSaved(false);
    const { value, errors: found } = toFractions(texts);
    setErrors(found);
    if (!value) {
      setError('Some tolerances need fixing: see the messages under the fields.');
      return;
    }
    // Only what changed: tolerances are design content (saving them returns a submitted project to draft); watchers are not.
    const base = conflict?.current ?? project;
    const body: { version: number; benchTolerances?: typeof value; watchers?: number[] } = { version };
    if (!sameTolerances(value, base.benchTolerances)) body.benchTolerances = value;
    if (!sameIds(watchers, base.watchers.map((w) => w.id))) body.watchers = watchers;
    if (!body.benchTolerances && !body.watchers) {
      if (conflict) {
        onSaved(conflict.current);
        setConflict(null);
      }
      setSaved(true);
      return;
    }
    setSaving(true);
    try {
      const r = await fetchJson<{ project: ProjectDetail }>(`/api/projects/${project.id}`, { method: 'PATCH', body });
      setConflict(null);
      setTexts(toTexts(r.project.benchTolerances));
      setWatchers(r.project.watchers.map((w) => w.id));
      setSeenVersion(r.project.version);
      onSaved(r.project);
      setSaved(true);
    } catch (err) {
      if (err instanceof ApiRequestError && err.status === 409 && (err.details as { current?: ProjectDetail } | undefined)?.current) {
        setConflict({ message: err.message, current: (err.details as { current: ProjectDetail }).current });
        return;
      }
      if (err instanceof ApiRequestError && err.fieldErrors) {
        const fe: Errors = {};
        for (const [k, v] of Object.entries(err.fieldErrors)) {
          const key = k.replace(/^benchTolerances\./, '') as BenchToleranceKey;
          if (BENCH_QUANTITIES.some((q) => q.key === key)) fe[key] = v[0];
        }
        setErrors(fe);
      }
      setError(err instanceof Error ? err.message : 'Could not save the settings.');
    } finally {
      setSaving(false);
    }
  };

  const reload = (current: ProjectDetail) => {
    setTexts(toTexts(current.benchTolerances));
    setWatchers(current.watchers.map((w) => w.id));
    setErrors({});
    setSeenVersion(current.version);
    onSaved(current);
    setConflict(null);
  };

  const candidates = users.filter((u) => !watchers.includes(u.id));

  return (
    <Card data-testid="review-settings">
      <CardHeader
        title="Review and bench settings"
        actions={editable && dirty && !saving ? <span className="text-xs text-near">unsaved changes</span> : saved ? <span className="text-xs text-ok">saved</span> : null}
      />
      <CardBody className="space-y-5">
        <section aria-labelledby="tolerances-heading" className="space-y-2">
          <h3 id="tolerances-heading" className="text-sm font-semibold">Bench-check tolerances</h3>
          <p className="max-w-3xl text-xs text-muted">
            How far a bench reading may stray from the design’s operating point and still pass: outside the tolerance it is
            reported as <em>check</em>, beyond twice the tolerance as <em>fail</em>. A quantity left empty uses the default of
            ±<span className="num">{DEFAULT_PERCENT}</span> % (common workshop practice).
          </p>
          {editable ? (
            <div className="grid grid-cols-[repeat(auto-fill,minmax(13rem,16rem))] gap-x-6 gap-y-3">
              {BENCH_QUANTITIES.map(({ key, label }) => {
                const text = texts[key] ?? '';
                const set = text.trim() !== '';
                return (
                  <div key={key} data-testid={`tolerance-${key}`}>
                    <Field label={`${label}${WHEN[key] ? ` (${WHEN[key]})` : ''} ±`} htmlFor={`tolerance-${key}`} unit="%" error={errors[key]}>
                      <Input
                        id={`tolerance-${key}`}
                        className="num"
                        inputMode="decimal"
                        placeholder="default"
                        value={text}
                        aria-invalid={Boolean(errors[key])}
                        aria-describedby={errors[key] ? `tolerance-${key}-error` : `tolerance-${key}-note`}
                        onChange={(e) => setText(key, e.target.value)}
                        onBlur={() => setErrors((er) => ({ ...er, [key]: toFractions({ [key]: texts[key] }).errors[key] }))}
                      />
                    </Field>
                    <div id={`tolerance-${key}-note`} className="mt-0.5 flex min-h-6 items-center justify-between gap-2 text-xs text-muted">
                      <span>{set ? 'project value' : `default ±${DEFAULT_PERCENT} % (common practice)`}</span>
                      {set ? (
                        <Button type="button" variant="ghost" size="sm" className="h-6 px-1.5 text-xs" aria-label={`Reset ${label} to default`} onClick={() => setText(key, '')}>
                          reset to default
                        </Button>
                      ) : null}
                    </div>
                  </div>
                );
              })}
            </div>
          ) : (
            <dl className="grid grid-cols-1 gap-x-6 gap-y-1 text-sm sm:grid-cols-2 lg:grid-cols-3" data-testid="tolerances-readonly">
              {BENCH_QUANTITIES.map(({ key, label }) => {
                const v = project.benchTolerances?.[key];
                return (
                  <div key={key} className="flex items-baseline justify-between gap-3 border-b border-rule/60 py-1" data-testid={`tolerance-${key}`}>
                    <dt className="text-muted">{label}{WHEN[key] ? ` (${WHEN[key]})` : ''}</dt>
                    <dd className="shrink-0 whitespace-nowrap">
                      {typeof v === 'number' ? (
                        <span>
                          <span className="num font-semibold">±{percentText(v)} %</span> <span className="text-xs text-muted">project</span>
                        </span>
                      ) : (
                        <span className="text-muted">
                          <span className="num">±{DEFAULT_PERCENT} %</span> default
                        </span>
                      )}
                    </dd>
                  </div>
                );
              })}
            </dl>
          )}
        </section>

        <section aria-labelledby="watchers-heading" className="space-y-2">
          <h3 id="watchers-heading" className="text-sm font-semibold">Watchers</h3>
          <p className="max-w-3xl text-xs text-muted">
            When a reviewer approves a revision or asks for changes, the designer (the project’s owner), whoever submitted it and
            every watcher get the decision summary by e-mail with the design report PDF attached.
          </p>
          {watchers.length ? (
            <ul className="flex flex-wrap gap-2" data-testid="watcher-list">
              {watchers.map((id) => (
                <li key={id} className="flex items-center gap-1 rounded-md border border-rule bg-paper px-2 py-1 text-sm">
                  <span>{names.get(id) ?? `user ${id}`}</span>
                  {roleOf.get(id) ? <span className="text-xs text-muted">· {roleOf.get(id)}</span> : null}
                  {project.owner?.id === id ? <span className="text-xs text-muted">· owner</span> : null}
                  {editable ? (
                    <Button type="button" variant="ghost" size="sm" className="ml-1 h-6 px-1.5" aria-label={`Remove watcher ${names.get(id) ?? id}`} onClick={() => { setSaved(false); setWatchers((w) => w.filter((x) => x !== id)); }}>
                      ✕
                    </Button>
                  ) : null}
                </li>
              ))}
            </ul>
          ) : (
            <p className="text-sm text-muted" data-testid="watcher-list">No watchers yet{project.owner ? `: only ${project.owner.displayName} (owner) and the submitter get the decision mail` : ''}.</p>
          )}
          {editable ? (
            <div className="flex max-w-md items-end gap-2">
              <Field label="Add a watcher" htmlFor="watcher-pick" className="flex-1">
                <Select id="watcher-pick" value={pick} onChange={(e) => setPick(e.target.value)}>
                  <option value="">Choose a user…</option>
                  {candidates.map((u) => (
                    <option key={u.id} value={String(u.id)}>
                      {u.displayName} ({u.role}{project.owner?.id === u.id ? ', owner' : ''})
                    </option>
                  ))}
                </Select>
              </Field>
              <Button
                type="button"
                variant="secondary"
                size="sm"
                className="mb-0.5"
                disabled={!pick}
                onClick={() => {
                  setSaved(false);
                  setWatchers((w) => [...new Set([...w, Number(pick)])]);
                  setPick('');
                }}
              >
                Add watcher
              </Button>
            </div>
          ) : null}
        </section>

        {conflict ? (
          <div role="alert" className="space-y-2 rounded-md border border-near/50 bg-near/10 px-3 py-2 text-sm">
            <p>{conflict.message}</p>
            <p className="text-xs text-muted">What you typed is still in the fields above.</p>
            <div className="flex gap-2">
              <Button type="button" size="sm" variant="secondary" onClick={() => reload(conflict.current)}>
                Reload their version
              </Button>
              <Button type="button" size="sm" disabled={saving} onClick={() => save(conflict.current.version)}>
                Save mine over it
              </Button>
            </div>
          </div>
        ) : null}
        {error ? <p role="alert" className="text-sm text-over">{error}</p> : null}
        {editable ? (
          <div className="flex flex-wrap items-center gap-3">
            <Button type="button" disabled={saving || !dirty} onClick={() => save(project.version)}>
              Save settings
            </Button>
            {project.status !== 'draft' && tolerancesDirty ? (
              <span className="text-xs text-near">Changing tolerances is a design change: the project goes back to draft.</span>
            ) : null}
          </div>
        ) : (
          <p className="text-xs text-muted">Read only{project.archived ? ': the project is archived' : ': designers and admins change these settings'}.</p>
        )}
      </CardBody>
    </Card>
  );
}

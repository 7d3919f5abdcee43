import { useState, type FormEvent } from 'react';
import { FormError, FormField } from '../../../components/form-field';
import { SafetyCaution } from '../../../components/safety-caution';
import { formErrors } from '../../../lib/form-errors';
import { useCreateVisit } from '../api/create-visit';

function localInputValue(date: Date): string {
  const pad = (n: number) => String(n).padStart(2, '0');
  return `${date.getFullYear()}-${pad(date.getMonth() + 1)}-${pad(date.getDate())}T${pad(date.getHours())}:${pad(date.getMinutes())}`;
}

/** Records a visit: when, what was done, what was found and what was replaced. */
export function VisitForm(props: { siteId: string; onSaved?: () => void }) {
  const create = useCreateVisit(props.siteId);
  const [visitedAt, setVisitedAt] = useState(() => localInputValue(new Date()));
  const [summary, setSummary] = useState('');
  const [findings, setFindings] = useState('');
  const [parts, setParts] = useState('');
  const [local, setLocal] = useState<Record<string, string>>({});
  const server = formErrors(create.error);

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const problems: Record<string, string> = {};
    if (!summary.trim()) problems.summary = 'Say in a few words what the visit was for';
    const when = new Date(visitedAt);
    if (Number.isNaN(when.getTime())) problems.visitedAt = 'Enter the date and time of the visit';
    setLocal(problems);
    if (Object.keys(problems).length) return;
    create.mutate(
      { visitedAt: when.toISOString(), summary: summary.trim(), findings, partsReplaced: parts },
      {
        onSuccess: () => {
          setSummary('');
          setFindings('');
          setParts('');
          props.onSaved?.();
        },
      },
    );
  };
  return (
    <form
      onSubmit={submit}
      noValidate
      className="wk-card space-y-3 p-4"
      aria-label="Record a visit"
    >
      <h3 className="font-semibold text-wk-ink-strong">Record a visit</h3>
      <SafetyCaution topics={['battery', 'wiring', 'well']} />
      <div className="grid gap-3 sm:grid-cols-2">
        <FormField
          label="When"
          type="datetime-local"
          value={visitedAt}
          onChange={(e) => setVisitedAt(e.target.value)}
          error={local.visitedAt ?? server.fields.visitedAt}
        />
        <FormField
          label="Summary"
          value={summary}
          maxLength={500}
          onChange={(e) => setSummary(e.target.value)}
          error={local.summary ?? server.fields.summary}
          placeholder="e.g. Replaced float switch"
        />
      </div>
      <label className="block text-label font-medium text-wk-ink">
        What was found
        <textarea
          className="wk-input mt-1 min-h-20"
          value={findings}
          onChange={(e) => setFindings(e.target.value)}
        />
      </label>
      <label className="block text-label font-medium text-wk-ink">
        Parts replaced
        <textarea
          className="wk-input mt-1 min-h-16"
          value={parts}
          onChange={(e) => setParts(e.target.value)}
        />
      </label>
      <FormError message={server.message} />
      <button type="submit" className="wk-button" disabled={create.isPending}>
        {create.isPending ? 'Saving…' : 'Save visit'}
      </button>
    </form>
  );
}

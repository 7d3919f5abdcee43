import { useTheme, type ThemeChoice } from '../lib/theme';

const CHOICES: { value: ThemeChoice; label: string }[] = [
  { value: 'system', label: 'Match device' },
  { value: 'light', label: 'Light' },
  { value: 'dark', label: 'Dark' },
];

export function ThemeSwitch() {
  const { choice, setChoice } = useTheme();
  return (
    <label className="inline-flex items-center gap-1 text-label text-wk-ink-soft">
      <span className="sr-only sm:not-sr-only">Theme</span>
      <select
        className="rounded-md border border-wk-line bg-wk-surface px-1.5 py-1 text-label text-wk-ink"
        value={choice}
        onChange={(e) => setChoice(e.target.value as ThemeChoice)}
      >
        {CHOICES.map((c) => (
          <option key={c.value} value={c.value}>
            {c.label}
          </option>
        ))}
      </select>
    </label>
  );
}

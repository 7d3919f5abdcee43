import { createContext, useContext, useEffect, useState, type ReactNode } from 'react';

export type ThemeChoice = 'system' | 'light' | 'dark';
const STORAGE_KEY = 'wellkept.theme';

interface ThemeState {
  choice: ThemeChoice;
  /** What is shown now (system resolved). */
  resolved: 'light' | 'dark';
  setChoice(choice: ThemeChoice): void;
}

const ThemeContext = createContext<ThemeState>({
  choice: 'system',
  resolved: 'light',
  setChoice: () => {},
});

function systemDark(): boolean {
  return typeof matchMedia === 'function' && matchMedia('(prefers-color-scheme: dark)').matches;
}

/** Light, dark or the system's choice; kept per browser, applied as a class on <html>. */
export function ThemeProvider(props: { children: ReactNode }) {
  const [choice, setChoiceState] = useState<ThemeChoice>(
    () => (localStorage.getItem(STORAGE_KEY) as ThemeChoice | null) ?? 'system',
  );
  const [dark, setDark] = useState(systemDark);

  useEffect(() => {
    if (typeof matchMedia !== 'function') return;
    const query = matchMedia('(prefers-color-scheme: dark)');
    const listener = () => setDark(query.matches);
    query.addEventListener('change', listener);
    return () => query.removeEventListener('change', listener);
  }, []);

  const resolved = choice === 'system' ? (dark ? 'dark' : 'light') : choice;
  // Set during render, not in an effect: charts read the palette's CSS variables while they
  // render, and must see the new theme's colours in the same pass.
  if (typeof document !== 'undefined') {
    document.documentElement.classList.toggle('dark', resolved === 'dark');
  }

  const setChoice = (next: ThemeChoice) => {
    localStorage.setItem(STORAGE_KEY, next);
    setChoiceState(next);
  };
  return (
    <ThemeContext.Provider value={{ choice, resolved, setChoice }}>
      {props.children}
    </ThemeContext.Provider>
  );
}

export function useTheme(): ThemeState {
  return useContext(ThemeContext);
}

/** A palette colour as a CSS colour string (for canvases such as uPlot). */
export function paletteColour(name: string, alpha = 1): string {
  const triple = getComputedStyle(document.documentElement).getPropertyValue(`--wk-${name}`).trim();
  return triple ? `rgb(${triple} / ${alpha})` : `rgb(100 100 100 / ${alpha})`;
}

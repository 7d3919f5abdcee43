import type { ReactNode } from 'react';

/** The quiet frame around signed-out pages: the mark, a title and one card. */
export function AuthFrame(props: { title: string; lead?: ReactNode; children: ReactNode }) {
  return (
    <main className="flex min-h-screen flex-col items-center justify-center bg-wk-raised px-4 py-10">
      <div className="mb-6 flex items-center gap-2 text-wk-brand-strong">
        <svg viewBox="0 0 32 32" className="h-8 w-8" aria-hidden="true">
          <rect width="32" height="32" rx="8" className="fill-wk-brand-strong" />
          <path d="M16 6c-4 6-7 9.5-7 13a7 7 0 0 0 14 0c0-3.5-3-7-7-13z" className="fill-wk-sun" />
        </svg>
        <span className="text-headline font-semibold tracking-tight">Wellkept</span>
      </div>
      <section
        className="wk-card w-full max-w-sm p-6 shadow-tremor-card"
        aria-labelledby="auth-title"
      >
        <h1 id="auth-title" className="text-headline font-semibold text-wk-ink-strong">
          {props.title}
        </h1>
        {props.lead && <div className="mt-1 text-wk-ink-soft">{props.lead}</div>}
        <div className="mt-5">{props.children}</div>
      </section>
    </main>
  );
}

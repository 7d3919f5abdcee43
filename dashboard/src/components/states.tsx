import type { ReactNode } from 'react';

/** A placeholder block while data loads (announced once to screen readers). */
export function Loading(props: { label?: string; rows?: number }) {
  const rows = props.rows ?? 3;
  return (
    <div role="status" aria-live="polite" className="space-y-2 py-2">
      <span className="sr-only">{props.label ?? 'Loading…'}</span>
      {Array.from({ length: rows }, (_, i) => (
        <div
          key={i}
          className="h-4 animate-pulse rounded bg-wk-sunken"
          style={{ width: `${90 - i * 17}%` }}
        />
      ))}
    </div>
  );
}

/** Nothing to show yet, said plainly, with what to do next when there is something to do. */
export function Empty(props: { title: string; children?: ReactNode }) {
  return (
    <div className="rounded-lg border border-dashed border-wk-line px-4 py-6 text-center">
      <p className="font-medium text-wk-ink">{props.title}</p>
      {props.children && <div className="mt-1 text-wk-ink-soft">{props.children}</div>}
    </div>
  );
}

/** Something failed: what, and a way to try again. */
export function Failure(props: { error: unknown; onRetry?: () => void; what?: string }) {
  const message =
    props.error instanceof Error ? props.error.message : 'Something went wrong on the way.';
  return (
    <div
      role="alert"
      className="rounded-lg border border-wk-act/40 bg-wk-act/5 px-4 py-3 text-wk-ink"
    >
      <p className="font-medium">{props.what ?? 'This could not be loaded.'}</p>
      <p className="text-wk-ink-soft">{message}</p>
      {props.onRetry && (
        <button type="button" className="wk-button-quiet mt-2" onClick={props.onRetry}>
          Try again
        </button>
      )}
    </div>
  );
}

/** Loading, error or content for one query, so every screen treats them the same way. */
export function QueryState<T>(props: {
  query: { data: T | undefined; error: unknown; isPending: boolean; refetch: () => unknown };
  what?: string;
  loadingRows?: number;
  children: (data: T) => ReactNode;
}) {
  const { query } = props;
  if (query.isPending) return <Loading rows={props.loadingRows} />;
  if (query.error || query.data === undefined) {
    return <Failure error={query.error} what={props.what} onRetry={() => void query.refetch()} />;
  }
  return <>{props.children(query.data)}</>;
}

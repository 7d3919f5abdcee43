import { SITE_HEALTH_LABELS, type SiteHealth } from '@wellkept/core';

/**
 * Site health as a word and a shape. Each shape differs without colour: steady is a ring with
 * a flat water line, watch a ring with a ripple, act a solid disc with an upright bar and dot,
 * silent a broken ring with nothing inside.
 */
/** Whole class names, so Tailwind finds them. */
const HEALTH_TEXT: Record<SiteHealth, string> = {
  steady: 'text-wk-steady',
  watch: 'text-wk-watch',
  act: 'text-wk-act',
  silent: 'text-wk-silent',
};

export function HealthGlyph(props: { health: SiteHealth; className?: string }) {
  const { health } = props;
  return (
    <svg
      viewBox="0 0 16 16"
      aria-hidden="true"
      className={`${props.className ?? 'h-4 w-4'} shrink-0 ${HEALTH_TEXT[health]}`}
      data-shape={health}
    >
      {health === 'steady' && (
        <>
          <circle cx="8" cy="8" r="6.25" fill="none" stroke="currentColor" strokeWidth="1.5" />
          <path d="M4.2 9h7.6" stroke="currentColor" strokeWidth="1.8" strokeLinecap="round" />
        </>
      )}
      {health === 'watch' && (
        <>
          <circle cx="8" cy="8" r="6.25" fill="none" stroke="currentColor" strokeWidth="1.5" />
          <path
            d="M4 8.6c1-1.4 2-1.4 2.7 0s1.7 1.4 2.6 0 1.8-1.4 2.7 0"
            fill="none"
            stroke="currentColor"
            strokeWidth="1.6"
            strokeLinecap="round"
          />
        </>
      )}
      {health === 'act' && (
        <>
          <circle cx="8" cy="8" r="7" fill="currentColor" />
          <path
            d="M8 4.2v4.6"
            stroke="rgb(var(--wk-surface))"
            strokeWidth="2"
            strokeLinecap="round"
          />
          <circle cx="8" cy="11.6" r="1.15" fill="rgb(var(--wk-surface))" />
        </>
      )}
      {health === 'silent' && (
        <circle
          cx="8"
          cy="8"
          r="6.25"
          fill="none"
          stroke="currentColor"
          strokeWidth="1.5"
          strokeDasharray="2.4 2.1"
        />
      )}
    </svg>
  );
}

/** The health word with its shape, as shown on boards and headers. */
export function HealthMark(props: { health: SiteHealth; size?: 'sm' | 'lg'; reason?: string }) {
  const large = props.size === 'lg';
  return (
    <span
      className={`inline-flex items-center gap-1.5 font-medium ${HEALTH_TEXT[props.health]} ${large ? 'text-body' : 'text-label'}`}
      title={props.reason}
      data-health={props.health}
    >
      <HealthGlyph health={props.health} className={large ? 'h-5 w-5' : 'h-4 w-4'} />
      <span>{SITE_HEALTH_LABELS[props.health]}</span>
    </span>
  );
}

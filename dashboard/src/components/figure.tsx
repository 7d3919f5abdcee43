import type { DisplayQuantity } from '@wellkept/core';

/** A figure with its unit, set in the monospaced face; the unit is quieter than the number. */
export function Figure(props: { quantity: DisplayQuantity; size?: 'sm' | 'lg'; label?: string }) {
  const { quantity } = props;
  const number =
    quantity.value === null ? quantity.text : quantity.text.replace(quantity.unit, '').trim();
  return (
    <span
      className={`wk-figure ${props.size === 'lg' ? 'text-figure text-wk-ink-strong' : 'text-wk-ink'}`}
      aria-label={props.label ? `${props.label}: ${quantity.text}` : undefined}
    >
      {number}
      {quantity.value !== null && (
        <span className="ml-0.5 text-[0.7em] font-normal text-wk-ink-soft">{quantity.unit}</span>
      )}
    </span>
  );
}

/** A labelled key number for headers and cards. */
export function KeyFigure(props: { label: string; quantity: DisplayQuantity; detail?: string }) {
  return (
    <div className="min-w-0">
      <dt className="wk-label">{props.label}</dt>
      <dd className="mt-0.5">
        <Figure quantity={props.quantity} size="lg" />
        {props.detail && <div className="text-label text-wk-ink-soft">{props.detail}</div>}
      </dd>
    </div>
  );
}

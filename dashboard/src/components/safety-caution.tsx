/**
 * The short caution shown wherever a screen suggests work on batteries, wiring or wells.
 * Owners are never told to open an enclosure or a battery box.
 */
const TEXT = {
  battery:
    'Battery banks hold enough energy to start a fire, and flooded cells vent hydrogen. Work on them only as local electrical codes and licensed practice allow.',
  wiring:
    'DC arcs do not put themselves out. Isolate and test before touching conductors, and follow local electrical codes and licensed practice.',
  well: 'Pulling a pump opens the well: disinfect it afterwards and follow local well codes and licensed practice.',
  owner:
    'Please leave enclosures and battery boxes closed. Your installer has been told and will handle anything inside them.',
} as const;

export type CautionTopic = keyof typeof TEXT;

export function SafetyCaution(props: { topics: CautionTopic[] }) {
  return (
    <aside
      aria-label="Safety caution"
      className="flex gap-3 rounded-lg border border-wk-sun/50 bg-wk-sun/10 px-3 py-2 text-label normal-case text-wk-ink"
    >
      <svg viewBox="0 0 16 16" aria-hidden="true" className="mt-0.5 h-4 w-4 shrink-0 text-wk-sun">
        <path
          d="M8 1.5 15 14H1z"
          fill="none"
          stroke="currentColor"
          strokeWidth="1.5"
          strokeLinejoin="round"
        />
        <path d="M8 6v3.5" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" />
        <circle cx="8" cy="11.6" r="0.9" fill="currentColor" />
      </svg>
      <div className="space-y-1 text-[0.8125rem] leading-5">
        <p className="font-semibold">Safety first</p>
        {props.topics.map((t) => (
          <p key={t}>{TEXT[t]}</p>
        ))}
      </div>
    </aside>
  );
}

import {
  formatDurationSeconds,
  formatQuantity,
  formatVolume,
  formatWatts,
  localDateString,
  type UnitSystem,
} from '@wellkept/core';
import { Table, TableBody, TableCell, TableHead, TableHeaderCell, TableRow } from '@tremor/react';
import { useMemo, useState } from 'react';
import { Figure } from '../../../components/figure';
import { Empty, QueryState } from '../../../components/states';
import { usePersonSettings } from '../../../lib/person-settings';
import { formatDateTime } from '../../../lib/time-format';
import { type PumpRun, usePumpRuns } from '../api/get-pump-runs';

const RANGES = { '1': 'Last 24 h', '7': 'Last 7 days', '30': 'Last 30 days' } as const;

/** Each pump run (start, duration, energy, water) and totals per day, in the person's units. */
export function RunLog(props: { siteId: string; pumps: { id: string; name: string }[] }) {
  const { unitSystem, timeZone } = usePersonSettings();
  const [pumpId, setPumpId] = useState('');
  const [days, setDays] = useState<keyof typeof RANGES>('7');
  const [from] = useMemo(
    () => [new Date(Date.now() - Number(days) * 86400_000).toISOString()],
    [days],
  );
  const runs = usePumpRuns({ siteId: props.siteId, pumpId: pumpId || undefined, from });
  const energy = (wh: number | null) =>
    wh === null ? null : formatQuantity(wh, 'Wh', { fractionDigits: 0 });
  return (
    <section aria-label="Run log" className="space-y-3">
      <div className="flex flex-wrap gap-3">
        <label className="text-label font-medium text-wk-ink">
          Pump
          <select
            className="wk-input mt-1"
            value={pumpId}
            onChange={(e) => setPumpId(e.target.value)}
          >
            <option value="">Every pump</option>
            {props.pumps.map((p) => (
              <option key={p.id} value={p.id}>
                {p.name}
              </option>
            ))}
          </select>
        </label>
        <label className="text-label font-medium text-wk-ink">
          Period
          <select
            className="wk-input mt-1"
            value={days}
            onChange={(e) => setDays(e.target.value as keyof typeof RANGES)}
          >
            {Object.entries(RANGES).map(([k, v]) => (
              <option key={k} value={k}>
                {v}
              </option>
            ))}
          </select>
        </label>
      </div>
      <QueryState query={runs} what="The run log could not be loaded.">
        {(page) =>
          page.runs.length === 0 ? (
            <Empty title="No pump runs in this period" />
          ) : (
            <>
              <dl className="grid grid-cols-2 gap-3 sm:grid-cols-4">
                <Total label="Runs" text={String(page.totals.runs)} />
                <Total label="Run time" text={formatDurationSeconds(page.totals.runSeconds)} />
                <Total
                  label="Energy"
                  text={formatWatts(page.totals.energyWh).text.replace(/W$/, 'Wh')}
                />
                <Total
                  label="Water delivered"
                  text={formatVolume(page.totals.waterM3, unitSystem).text}
                />
              </dl>
              <DayTotals runs={page.runs} timeZone={timeZone} unitSystem={unitSystem} />
              <div className="wk-card overflow-x-auto">
                <Table>
                  <TableHead>
                    <TableRow>
                      <TableHeaderCell>Pump</TableHeaderCell>
                      <TableHeaderCell>Started</TableHeaderCell>
                      <TableHeaderCell>Ran for</TableHeaderCell>
                      <TableHeaderCell className="text-right">Energy</TableHeaderCell>
                      <TableHeaderCell className="text-right">Water</TableHeaderCell>
                    </TableRow>
                  </TableHead>
                  <TableBody>
                    {page.runs.map((r) => (
                      <TableRow key={r.id}>
                        <TableCell>{r.pumpName}</TableCell>
                        <TableCell>{formatDateTime(r.startedAt, timeZone)}</TableCell>
                        <TableCell className="font-mono">
                          {r.durationS === null ? 'running' : formatDurationSeconds(r.durationS)}
                          {r.spansGap && (
                            <span className="ml-1 text-label text-wk-ink-faint">(data gap)</span>
                          )}
                        </TableCell>
                        <TableCell className="text-right">
                          {energy(r.energyWh) ? <Figure quantity={energy(r.energyWh)!} /> : '—'}
                        </TableCell>
                        <TableCell className="text-right">
                          {r.waterM3 === null ? (
                            '—'
                          ) : (
                            <Figure quantity={formatVolume(r.waterM3, unitSystem)} />
                          )}
                          {r.waterSource && (
                            <span className="block text-label text-wk-ink-faint">
                              {r.waterSource === 'tank_rise' ? 'from tank rise' : 'from flow meter'}
                            </span>
                          )}
                        </TableCell>
                      </TableRow>
                    ))}
                  </TableBody>
                </Table>
              </div>
            </>
          )
        }
      </QueryState>
    </section>
  );
}

/** Runs, run time, energy and water for each local day of the runs shown. */
function DayTotals(p: { runs: PumpRun[]; timeZone: string; unitSystem: UnitSystem }) {
  const days = new Map<
    string,
    { runs: number; seconds: number; energyWh: number; water: number }
  >();
  for (const r of p.runs) {
    const day = localDateString(Date.parse(r.startedAt) / 1000, p.timeZone);
    const d = days.get(day) ?? { runs: 0, seconds: 0, energyWh: 0, water: 0 };
    d.runs += 1;
    d.seconds += r.durationS ?? 0;
    d.energyWh += r.energyWh ?? 0;
    d.water += r.waterM3 ?? 0;
    days.set(day, d);
  }
  return (
    <section className="wk-card p-3" aria-labelledby="day-totals">
      <h3 id="day-totals" className="font-medium text-wk-ink-strong">
        Totals per day
      </h3>
      <table className="mt-2 w-full text-label">
        <thead className="text-left text-wk-ink-soft">
          <tr>
            <th scope="col" className="py-1 font-medium">
              Day
            </th>
            <th scope="col" className="py-1 text-right font-medium">
              Runs
            </th>
            <th scope="col" className="py-1 text-right font-medium">
              Run time
            </th>
            <th scope="col" className="py-1 text-right font-medium">
              Energy
            </th>
            <th scope="col" className="py-1 text-right font-medium">
              Water
            </th>
          </tr>
        </thead>
        <tbody className="font-mono">
          {[...days].map(([day, d]) => (
            <tr key={day} className="border-t border-wk-line">
              <th scope="row" className="py-1 text-left font-normal">
                {day}
              </th>
              <td className="py-1 text-right">{d.runs}</td>
              <td className="py-1 text-right">{formatDurationSeconds(d.seconds)}</td>
              <td className="py-1 text-right">
                {formatQuantity(d.energyWh, 'Wh', { fractionDigits: 0 }).text}
              </td>
              <td className="py-1 text-right">{formatVolume(d.water, p.unitSystem).text}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </section>
  );
}

function Total(props: { label: string; text: string }) {
  return (
    <div className="wk-card p-3">
      <dt className="wk-label">{props.label}</dt>
      <dd className="wk-figure text-headline text-wk-ink-strong">{props.text}</dd>
    </div>
  );
}

import { describe, expect, it } from 'vitest';
import {
  RULE_EVALUATORS,
  RULE_MEASUREMENTS,
  type AlertKind,
  type RuleInput,
  type Sample,
} from '../../src/index.js';
import { input, ranchSite, series } from './fixtures.js';

// Our own contract (no published value): the ingest service loads only RULE_MEASUREMENTS for the
// rules, so an evaluator reading anything else would silently see no data.
const asPattern = (name: string) =>
  RULE_MEASUREMENTS.find((p) => new RegExp(`^${p.replace(/<[^>]+>/g, '[^/]+')}$`).test(name)) ??
  name;

/** Series for any name asked, of the kind its name implies; records each name read. */
function recordingSeries(fromT: number, toT: number, read: Set<string>): RuleInput['series'] {
  return new Proxy({} as RuleInput['series'], {
    get(_, name) {
      if (typeof name !== 'string') return undefined;
      read.add(name);
      let value: (t: number) => number | boolean | string = (t) => 24 + Math.sin(t / 3600);
      if (/\/(running|closed)$/.test(name)) value = (t) => Math.floor(t / 1800) % 2 === 0;
      else if (name === 'controller/stage')
        value = (t) => (Math.floor(t / 3600) % 3 === 0 ? 'float' : 'bulk');
      return series(fromT, toT, 60, value) as Sample<number | boolean | string>[];
    },
  });
}

describe('the measurements the rules read', () => {
  it('are exactly the listed ones, over every evaluator, by day and by night', () => {
    const site = ranchSite();
    const read = new Set<string>();
    for (const nowT of [Date.UTC(2025, 5, 10, 18) / 1000, Date.UTC(2025, 5, 11, 9) / 1000]) {
      const seriesMap = recordingSeries(nowT - 30 * 3600, nowT, read);
      for (const kind of Object.keys(RULE_EVALUATORS) as AlertKind[]) {
        RULE_EVALUATORS[kind](input(site, nowT, seriesMap));
      }
    }
    expect([...new Set([...read].map(asPattern))].sort()).toEqual([...RULE_MEASUREMENTS].sort());
  });
});

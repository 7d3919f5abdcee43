import { queryOptions, useQuery } from '@tanstack/react-query';
import type { SiteHealth } from '@wellkept/core';
import { request } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

/** One site on GET /api/fleet (worst first). */
export interface FleetSite {
  id: string;
  name: string;
  locality: string;
  health: SiteHealth;
  healthReason: string;
  lastSeenAt: string | null;
  openAlerts: { count: number; kinds: string[] };
  battery: {
    stateOfChargePercent: number | null;
    lowPercent: number;
    highPercent: number;
    confidence: 'good' | 'wide' | 'indeterminate';
    volts: number | null;
    at: string | null;
  } | null;
  water: {
    storedM3: number;
    capacityM3: number;
    percent: number;
    daysLeft: number | null;
    at: string | null;
  } | null;
  spark: { measurement: string; unit: string; values: (number | null)[] } | null;
}

export interface FleetOverview {
  generatedAt: string;
  /** Start of the first spark hour, ms since the epoch. */
  sparkStart: number;
  counts: Record<SiteHealth, number>;
  sites: FleetSite[];
}

export function getFleet(): Promise<FleetOverview> {
  return request<FleetOverview>('/fleet');
}

export const fleetQueryOptions = () =>
  queryOptions({ queryKey: queryKeys.fleet, queryFn: getFleet, refetchInterval: 60_000 });

export function useFleet() {
  return useQuery(fleetQueryOptions());
}

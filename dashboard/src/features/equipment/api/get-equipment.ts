import { queryOptions, useQuery } from '@tanstack/react-query';
import { request } from '../../../lib/api-client';

export interface BatteryBank {
  id: string;
  name: string | null;
  chemistry: 'flooded' | 'agm' | 'gel' | 'lifepo4';
  nominalVoltageV: number;
  capacityAh: number;
  strings: number;
  installedOn: string | null;
  notes: string;
}
export interface Well {
  id: string;
  depthM: number;
  casingDiameterM: number;
  staticLevelM: number | null;
  pumpSettingM: number | null;
  notes: string;
}
export interface Pump {
  id: string;
  key: string;
  name: string;
  kind: 'well' | 'booster' | 'transfer';
  supply: 'battery' | 'pv_direct';
  ratedCurrentA: number;
  ratedFlowM3s: number | null;
  motorPowerW: number | null;
  rebuildIntervalH: number | null;
  notes: string;
}
export interface Tank {
  id: string;
  key: string;
  name: string;
  kind: 'storage' | 'pressure';
  geometry: 'vertical_cylinder' | 'horizontal_cylinder' | 'rectangular' | null;
  diameterM: number | null;
  lengthM: number | null;
  widthM: number | null;
  heightM: number | null;
  sensorOffsetM: number;
  capacityM3: number | null;
  prechargePa: number | null;
  cutInPa: number | null;
  cutOutPa: number | null;
  notes: string;
}
export interface PvArray {
  id: string;
  key: string;
  name: string;
  ratedW: number;
  purpose: 'battery_charging' | 'pump_direct';
  notes: string;
}
export interface FloatSwitch {
  id: string;
  key: string;
  name: string;
  tankId: string;
  logic: 'closes_on_low' | 'opens_on_high';
  notes: string;
}

/** GET /api/sites/:siteId/equipment */
export interface Equipment {
  batteryBank: BatteryBank | null;
  well: Well | null;
  pumps: Pump[];
  tanks: Tank[];
  pvArrays: PvArray[];
  floatSwitches: FloatSwitch[];
}

export function getEquipment(siteId: string): Promise<Equipment> {
  return request<Equipment>(`/sites/${siteId}/equipment`);
}

export const equipmentQueryOptions = (siteId: string) =>
  queryOptions({
    queryKey: ['sites', siteId, 'equipment'] as const,
    queryFn: () => getEquipment(siteId),
    staleTime: 5 * 60_000,
  });

export function useEquipment(siteId: string) {
  return useQuery(equipmentQueryOptions(siteId));
}

import { useMutation, useQueryClient } from '@tanstack/react-query';
import { request } from '../../../lib/api-client';
import { equipmentQueryOptions } from './get-equipment';

export interface BatteryBankBody {
  name?: string;
  chemistry: 'flooded' | 'agm' | 'gel' | 'lifepo4';
  nominalVoltageV: number;
  capacityAh: number;
  strings?: number;
  installedOn?: string | null;
  notes?: string;
}

export interface WellBody {
  depthM: number;
  casingDiameterM: number;
  staticLevelM?: number | null;
  pumpSettingM?: number | null;
  notes?: string;
}

/** PUT /api/sites/:siteId/equipment/battery-bank and …/well (admins). */
export function usePutEquipment<T extends BatteryBankBody | WellBody>(
  siteId: string,
  part: 'battery-bank' | 'well',
) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: T) =>
      request<unknown>(`/sites/${siteId}/equipment/${part}`, { method: 'PUT', body }),
    onSuccess: () =>
      queryClient.invalidateQueries({ queryKey: equipmentQueryOptions(siteId).queryKey }),
  });
}

import {
  formatFlowRate,
  formatLength,
  formatPressure,
  formatVolume,
  formatWatts,
  tankCapacityCubicMetres,
} from '@wellkept/core';
import { Card } from '@tremor/react';
import type { ReactNode } from 'react';
import { Figure } from '../../../components/figure';
import { QueryState } from '../../../components/states';
import { usePersonSettings } from '../../../lib/person-settings';
import { type Tank, useEquipment } from '../api/get-equipment';
import { BatteryBankForm } from './battery-bank-form';
import { WellForm } from './well-form';

function tankCapacity(t: Tank): number | null {
  if (t.kind === 'pressure') return t.capacityM3;
  switch (t.geometry) {
    case 'vertical_cylinder':
      return tankCapacityCubicMetres({
        shape: t.geometry,
        diameterMetres: t.diameterM ?? 0,
        heightMetres: t.heightM ?? 0,
      });
    case 'horizontal_cylinder':
      return tankCapacityCubicMetres({
        shape: t.geometry,
        diameterMetres: t.diameterM ?? 0,
        lengthMetres: t.lengthM ?? 0,
      });
    case 'rectangular':
      return tankCapacityCubicMetres({
        shape: t.geometry,
        lengthMetres: t.lengthM ?? 0,
        widthMetres: t.widthM ?? 0,
        heightMetres: t.heightM ?? 0,
      });
    default:
      return null;
  }
}

/** Everything installed at a site, in the person's units; admins edit the bank and the well. */
export function EquipmentPanel(props: { siteId: string; isAdmin: boolean; extra?: ReactNode }) {
  const equipment = useEquipment(props.siteId);
  const { unitSystem } = usePersonSettings();
  return (
    <QueryState query={equipment} what="The equipment could not be loaded.">
      {(e) => (
        <div className="grid gap-4 lg:grid-cols-2">
          <Card className="space-y-2">
            <h3 className="font-semibold text-wk-ink-strong">Battery bank</h3>
            {e.batteryBank ? (
              <p className="text-wk-ink">
                {e.batteryBank.chemistry.toUpperCase()} ·{' '}
                <Figure
                  quantity={{
                    value: e.batteryBank.nominalVoltageV,
                    unit: 'V',
                    text: `${e.batteryBank.nominalVoltageV} V`,
                  }}
                />{' '}
                ·{' '}
                <Figure
                  quantity={{
                    value: e.batteryBank.capacityAh,
                    unit: 'Ah',
                    text: `${e.batteryBank.capacityAh} Ah`,
                  }}
                />
              </p>
            ) : (
              <p className="text-wk-ink-soft">No battery bank (a PV-direct site).</p>
            )}
            {props.isAdmin && (
              <details>
                <summary className="cursor-pointer font-medium text-wk-brand">
                  Change the battery bank
                </summary>
                <div className="mt-2">
                  <BatteryBankForm siteId={props.siteId} bank={e.batteryBank} />
                </div>
              </details>
            )}
          </Card>
          <Card className="space-y-2">
            <h3 className="font-semibold text-wk-ink-strong">Well</h3>
            {e.well ? (
              <p className="text-wk-ink">
                Depth{' '}
                <Figure quantity={formatLength(e.well.depthM, unitSystem, { fractionDigits: 0 })} />
                {e.well.pumpSettingM !== null && (
                  <>
                    {' '}
                    · pump at{' '}
                    <Figure
                      quantity={formatLength(e.well.pumpSettingM, unitSystem, {
                        fractionDigits: 0,
                      })}
                    />
                  </>
                )}
                {e.well.staticLevelM !== null && (
                  <>
                    {' '}
                    · water at rest{' '}
                    <Figure
                      quantity={formatLength(e.well.staticLevelM, unitSystem, {
                        fractionDigits: 0,
                      })}
                    />
                  </>
                )}
              </p>
            ) : (
              <p className="text-wk-ink-soft">No well recorded.</p>
            )}
            {props.isAdmin && (
              <details>
                <summary className="cursor-pointer font-medium text-wk-brand">
                  Change the well
                </summary>
                <div className="mt-2">
                  <WellForm siteId={props.siteId} well={e.well} />
                </div>
              </details>
            )}
          </Card>
          <Card className="space-y-2">
            <h3 className="font-semibold text-wk-ink-strong">Pumps</h3>
            <ul className="space-y-1">
              {e.pumps.map((p) => (
                <li key={p.id} className="text-wk-ink">
                  <span className="font-medium">{p.name}</span>{' '}
                  <span className="text-label text-wk-ink-soft">
                    {p.kind} ·{' '}
                    {p.supply === 'pv_direct' ? 'runs straight from PV' : 'runs from the battery'} ·
                    rated {p.ratedCurrentA} A
                    {p.ratedFlowM3s !== null &&
                      ` · ${formatFlowRate(p.ratedFlowM3s, unitSystem).text}`}
                    {p.motorPowerW !== null && ` · ${formatWatts(p.motorPowerW).text}`}
                  </span>
                </li>
              ))}
              {e.pumps.length === 0 && <li className="text-wk-ink-soft">No pumps recorded.</li>}
            </ul>
          </Card>
          <Card className="space-y-2">
            <h3 className="font-semibold text-wk-ink-strong">Tanks and solar</h3>
            <ul className="space-y-1">
              {e.tanks.map((t) => {
                const capacity = tankCapacity(t);
                return (
                  <li key={t.id} className="text-wk-ink">
                    <span className="font-medium">{t.name}</span>{' '}
                    <span className="text-label text-wk-ink-soft">
                      {t.kind === 'storage' ? 'storage' : 'pressure tank'}
                      {capacity !== null &&
                        ` · holds ${formatVolume(capacity, unitSystem, { fractionDigits: 0 }).text}`}
                      {t.cutInPa !== null &&
                        t.cutOutPa !== null &&
                        ` · ${formatPressure(t.cutInPa, unitSystem, { fractionDigits: 0 }).text}–${formatPressure(t.cutOutPa, unitSystem, { fractionDigits: 0 }).text}`}
                    </span>
                  </li>
                );
              })}
              {e.pvArrays.map((a) => (
                <li key={a.id} className="text-wk-ink">
                  <span className="font-medium">{a.name}</span>{' '}
                  <span className="text-label text-wk-ink-soft">
                    PV · {formatWatts(a.ratedW).text} ·{' '}
                    {a.purpose === 'pump_direct' ? 'drives a pump' : 'charges the battery'}
                  </span>
                </li>
              ))}
            </ul>
          </Card>
          {props.extra}
        </div>
      )}
    </QueryState>
  );
}

import {
  formatLength,
  inchesToMetres,
  lengthToMetres,
  metresToInches,
  type UnitSystem,
} from '@wellkept/core';
import { useState, type FormEvent } from 'react';
import { FormError, FormField } from '../../../components/form-field';
import { SafetyCaution } from '../../../components/safety-caution';
import { formErrors } from '../../../lib/form-errors';
import { usePersonSettings } from '../../../lib/person-settings';
import type { Well } from '../api/get-equipment';
import { usePutEquipment, type WellBody } from '../api/put-equipment';

/** Casing diameters: inches (US) or millimetres (metric), converted by core. */
function casingToMetres(value: number, system: UnitSystem): number {
  return system === 'us' ? inchesToMetres(value) : value / 1000;
}
function casingFromMetres(metres: number, system: UnitSystem): number {
  return system === 'us'
    ? Math.round(metresToInches(metres) * 100) / 100
    : Math.round(metres * 1000);
}
const lengthShown = (m: number | null | undefined, system: UnitSystem) =>
  m === null || m === undefined ? '' : String(formatLength(m, system, { fractionDigits: 1 }).value);

/** The well (admins): depths in feet or metres as the person prefers, stored in metres. */
export function WellForm(props: { siteId: string; well: Well | null }) {
  const { unitSystem } = usePersonSettings();
  const put = usePutEquipment<WellBody>(props.siteId, 'well');
  const [depth, setDepth] = useState(lengthShown(props.well?.depthM, unitSystem));
  const [casing, setCasing] = useState(
    props.well
      ? String(casingFromMetres(props.well.casingDiameterM, unitSystem))
      : unitSystem === 'us'
        ? '4'
        : '100',
  );
  const [staticLevel, setStaticLevel] = useState(lengthShown(props.well?.staticLevelM, unitSystem));
  const [setting, setSetting] = useState(lengthShown(props.well?.pumpSettingM, unitSystem));
  const [local, setLocal] = useState<Record<string, string>>({});
  const server = formErrors(put.error);
  const lengthUnit = unitSystem === 'us' ? 'ft' : 'm';

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const problems: Record<string, string> = {};
    const d = Number(depth);
    const c = Number(casing);
    const s = staticLevel === '' ? null : Number(staticLevel);
    const p = setting === '' ? null : Number(setting);
    if (!(d > 0)) problems.depthM = 'Depth must be greater than zero';
    if (!(c > 0)) problems.casingDiameterM = 'Casing diameter must be greater than zero';
    if (s !== null && !(s >= 0 && s < d))
      problems.staticLevelM = 'Must be between zero and the well depth';
    if (p !== null && !(p > 0 && p < d))
      problems.pumpSettingM = 'Must be above the bottom of the well';
    setLocal(problems);
    if (Object.keys(problems).length) return;
    put.mutate({
      depthM: lengthToMetres(d, unitSystem),
      casingDiameterM: casingToMetres(c, unitSystem),
      staticLevelM: s === null ? null : lengthToMetres(s, unitSystem),
      pumpSettingM: p === null ? null : lengthToMetres(p, unitSystem),
    });
  };
  return (
    <form onSubmit={submit} noValidate className="space-y-3" aria-label="Well">
      <SafetyCaution topics={['well']} />
      <div className="grid gap-3 sm:grid-cols-2">
        <FormField
          label="Well depth"
          unit={lengthUnit}
          inputMode="decimal"
          value={depth}
          onChange={(e) => setDepth(e.target.value)}
          error={local.depthM ?? server.fields.depthM}
        />
        <FormField
          label="Casing diameter"
          unit={unitSystem === 'us' ? 'in' : 'mm'}
          inputMode="decimal"
          value={casing}
          onChange={(e) => setCasing(e.target.value)}
          error={local.casingDiameterM ?? server.fields.casingDiameterM}
          hint={unitSystem === 'us' ? 'Often 4 in.' : 'Often about 100 mm.'}
        />
        <FormField
          label="Static water level"
          unit={lengthUnit}
          inputMode="decimal"
          value={staticLevel}
          onChange={(e) => setStaticLevel(e.target.value)}
          error={local.staticLevelM ?? server.fields.staticLevelM}
          hint="Depth to water at rest (optional)."
        />
        <FormField
          label="Pump setting"
          unit={lengthUnit}
          inputMode="decimal"
          value={setting}
          onChange={(e) => setSetting(e.target.value)}
          error={local.pumpSettingM ?? server.fields.pumpSettingM}
          hint="Depth of the pump (optional)."
        />
      </div>
      <FormError message={server.message} />
      <button type="submit" className="wk-button" disabled={put.isPending}>
        {put.isPending ? 'Saving…' : 'Save well'}
      </button>
      {put.isSuccess && (
        <p role="status" className="text-label text-wk-steady">
          Saved.
        </p>
      )}
    </form>
  );
}

/**
 * A drilled well: water stands at the static level at rest and falls while the pump runs, until
 * the aquifer's inflow (proportional to the drawdown, the well's specific capacity) matches the
 * pump. The casing is the only storage, so the level follows
 *   casing area × d(depth)/dt = pumped flow − specific capacity × (depth − static depth),
 * solved exactly over each step (the casing is small and the equation stiff).
 */

/** Design drawdown at rated flow, as a share of the water column above the pump. */
const DESIGN_DRAWDOWN_SHARE = 0.25;

export interface WellSpec {
  depthM: number;
  casingDiameterM: number;
  staticLevelM: number;
  pumpSettingM: number;
}

export interface WellCondition {
  /** Depth to water at rest, metres. */
  staticDepthMetres: number;
  /** Inflow per metre of drawdown, m³/s per m. */
  specificCapacity: number;
}

export class Well {
  /** Depth from the well head to the water, metres. */
  depthToWaterMetres: number;
  readonly casingAreaSquareMetres: number;
  readonly normal: WellCondition;
  /** Depth at which the pump's intake draws air, metres. */
  readonly intakeDepthMetres: number;

  constructor(
    readonly spec: WellSpec,
    ratedFlowCubicMetresPerSecond: number,
  ) {
    this.casingAreaSquareMetres = Math.PI * (spec.casingDiameterM / 2) ** 2;
    const column = Math.max(spec.pumpSettingM - spec.staticLevelM, 1);
    this.normal = {
      staticDepthMetres: spec.staticLevelM,
      specificCapacity: ratedFlowCubicMetresPerSecond / (DESIGN_DRAWDOWN_SHARE * column),
    };
    this.intakeDepthMetres = spec.pumpSettingM - 0.5;
    this.depthToWaterMetres = spec.staticLevelM;
  }

  /**
   * A well drawn down by drought or neighbours: the water stands just above the intake and
   * comes back slowly.
   */
  drawnDown(): WellCondition {
    return {
      staticDepthMetres: this.intakeDepthMetres - 2,
      specificCapacity: this.normal.specificCapacity * 0.1,
    };
  }

  /** True while there is water over the intake. */
  hasWaterAtIntake(): boolean {
    return this.depthToWaterMetres < this.intakeDepthMetres;
  }

  /** Advances the water level with `pumpedFlow` m³/s taken out for `dtSeconds`. */
  step(pumpedFlow: number, condition: WellCondition, dtSeconds: number): void {
    const sc = condition.specificCapacity;
    const equilibrium = condition.staticDepthMetres + pumpedFlow / sc;
    const k = Math.exp((-dtSeconds * sc) / this.casingAreaSquareMetres);
    this.depthToWaterMetres = equilibrium + (this.depthToWaterMetres - equilibrium) * k;
    this.depthToWaterMetres = Math.min(this.depthToWaterMetres, this.spec.depthM);
  }
}

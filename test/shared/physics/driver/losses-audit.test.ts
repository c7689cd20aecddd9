import { describe, expect, it } from 'vitest';
import { bridgeLossParts, modulatorLossParts, railMoments } from '../../../../shared/physics/driver/losses.ts';
import type { DriverDevice } from '../../../../shared/schemas/driver.ts';

// A MOSFET has no saturation voltage: a V_CE(sat) figure left in its entry must not be charged
// (Graovac et al. 2006 [recalled]: MOSFET conduction is I²·R_ds(on) only).
const MOSFET_WITH_VCE: DriverDevice = {
  role: 'bridge',
  kind: 'mosfet',
  rdsOnOhm: 0.1,
  rdsOnTempCoeffPerK: 0,
  vceSatV: 2,
  riseTimeS: 0,
  fallTimeS: 0,
  outputCapacitanceF: 0,
  tjMaxC: 150,
  thermal: { foster: [{ rKPerW: 1, tauS: 0.01 }], caseToSinkKPerW: 0, sinkToAmbientKPerW: 1, sinkHeatCapacityJPerK: 0 },
};

describe('MOSFET conduction carries no V_CE(sat) term', () => {
  it('bridge and modulator', () => {
    expect(bridgeLossParts(MOSFET_WITH_VCE, 'half-bridge', 300e3, railMoments(0.0625, 24, 576)).conductionFixedW).toBe(0);
    expect(modulatorLossParts({ ...MOSFET_WITH_VCE, role: 'modulator' }, 160, 150e3, 0.025, 80, 6400).conductionFixedW).toBe(0);
  });
});

/**
 * Demo driver profiles, one per modulation scheme. Names and device figures are INVENTED (plausible
 * orders of magnitude for small solid-state coils), not any real part's datasheet data. Device
 * entries are per switch (see shared/schemas/driver.ts).
 */
import type { DriverProfile } from '../schemas/driver.ts';
import { DEMO_SMALL_DRIVER } from './small-rig.ts';

/**
 * Rail-linear demo: a 48 V half-bridge whose rail is set by a linear pass device. At silence the
 * rail idles at 24 V and the pass device dissipates g·V_s²/4 = 36 W — its sink is sized for that.
 *
 * @example simulateRail(DEMO_DRIVER_LINEAR, coil, rail)
 */
export const DEMO_DRIVER_LINEAR: DriverProfile = {
  name: 'Wren-48 linear rail (demo)',
  topology: 'half-bridge',
  supplyVoltageV: 48,
  fullRailCurrentA: 3,
  supplyCurrentLimitA: 6,
  ambientC: 25,
  scheme: 'rail-linear',
  devices: [
    {
      role: 'bridge',
      kind: 'mosfet',
      rdsOnOhm: 0.08,
      rdsOnTempCoeffPerK: 0.007,
      vceSatV: null,
      riseTimeS: 25e-9,
      fallTimeS: 20e-9,
      outputCapacitanceF: 180e-12,
      tjMaxC: 150,
      thermal: {
        foster: [
          { rKPerW: 0.04, tauS: 3e-5 },
          { rKPerW: 0.12, tauS: 4e-4 },
          { rKPerW: 0.3, tauS: 4e-3 },
          { rKPerW: 0.24, tauS: 3e-2 },
        ],
        caseToSinkKPerW: 0.5,
        sinkToAmbientKPerW: 3,
        sinkHeatCapacityJPerK: 50,
      },
    },
    {
      role: 'pass',
      kind: 'mosfet',
      rdsOnOhm: 0.03,
      rdsOnTempCoeffPerK: 0.006,
      vceSatV: null,
      riseTimeS: 0,
      fallTimeS: 0,
      outputCapacitanceF: 1e-9,
      tjMaxC: 175,
      thermal: {
        foster: [
          { rKPerW: 0.03, tauS: 5e-5 },
          { rKPerW: 0.1, tauS: 8e-4 },
          { rKPerW: 0.17, tauS: 8e-3 },
          { rKPerW: 0.1, tauS: 5e-2 },
        ],
        caseToSinkKPerW: 0.2,
        sinkToAmbientKPerW: 0.9,
        sinkHeatCapacityJPerK: 250,
      },
    },
  ],
};

/**
 * Rail-switched demo: a 160 V full bridge fed by a 150 kHz buck modulator.
 *
 * @example simulateRail(DEMO_DRIVER_BUCK, coil, rail)
 */
export const DEMO_DRIVER_BUCK: DriverProfile = {
  name: 'Heron-160 buck rail (demo)',
  topology: 'full-bridge',
  supplyVoltageV: 160,
  fullRailCurrentA: 4,
  supplyCurrentLimitA: 8,
  ambientC: 30,
  scheme: 'rail-switched',
  pwmFrequencyHz: 150e3,
  devices: [
    {
      role: 'bridge',
      kind: 'mosfet',
      rdsOnOhm: 0.15,
      rdsOnTempCoeffPerK: 0.008,
      vceSatV: null,
      riseTimeS: 30e-9,
      fallTimeS: 25e-9,
      outputCapacitanceF: 120e-12,
      tjMaxC: 150,
      thermal: {
        foster: [
          { rKPerW: 0.05, tauS: 4e-5 },
          { rKPerW: 0.15, tauS: 6e-4 },
          { rKPerW: 0.25, tauS: 6e-3 },
          { rKPerW: 0.15, tauS: 4e-2 },
        ],
        caseToSinkKPerW: 0.4,
        sinkToAmbientKPerW: 2.5,
        sinkHeatCapacityJPerK: 60,
      },
    },
    {
      role: 'modulator',
      kind: 'mosfet',
      rdsOnOhm: 0.1,
      rdsOnTempCoeffPerK: 0.008,
      vceSatV: null,
      riseTimeS: 20e-9,
      fallTimeS: 20e-9,
      outputCapacitanceF: 200e-12,
      tjMaxC: 150,
      thermal: {
        foster: [
          { rKPerW: 0.04, tauS: 4e-5 },
          { rKPerW: 0.12, tauS: 6e-4 },
          { rKPerW: 0.2, tauS: 6e-3 },
          { rKPerW: 0.14, tauS: 4e-2 },
        ],
        caseToSinkKPerW: 0.3,
        sinkToAmbientKPerW: 2,
        sinkHeatCapacityJPerK: 80,
      },
    },
  ],
};

/**
 * Pulse demo: a 320 V IGBT full bridge driven in short pulses (interrupted drive).
 *
 * @example simulatePulses(DEMO_DRIVER_PULSE, coil, pulses, durationS)
 */
export const DEMO_DRIVER_PULSE: DriverProfile = {
  name: 'Osprey-320 pulsed (demo)',
  topology: 'full-bridge',
  supplyVoltageV: 320,
  fullRailCurrentA: 12,
  supplyCurrentLimitA: 20,
  ambientC: 25,
  scheme: 'pulse',
  pulse: { maxOnTimeS: 150e-6, minOffTimeS: 1e-3, maxDuty: 0.08 },
  devices: [
    {
      role: 'bridge',
      kind: 'igbt',
      rdsOnOhm: null,
      vceSatV: 1.9,
      riseTimeS: 40e-9,
      fallTimeS: 90e-9,
      outputCapacitanceF: 150e-12,
      tjMaxC: 150,
      thermal: {
        foster: [
          { rKPerW: 0.05, tauS: 8e-5 },
          { rKPerW: 0.15, tauS: 1e-3 },
          { rKPerW: 0.2, tauS: 1e-2 },
          { rKPerW: 0.1, tauS: 6e-2 },
        ],
        caseToSinkKPerW: 0.3,
        sinkToAmbientKPerW: 1.2,
        sinkHeatCapacityJPerK: 100,
      },
    },
  ],
};

/**
 * All demo driver profiles: one per scheme for the desk-size coil, then the small rig's single
 * bipolar driver (./small-rig.ts, planned on its own coil `thimble`).
 */
export const DEMO_DRIVERS: readonly DriverProfile[] = [DEMO_DRIVER_LINEAR, DEMO_DRIVER_BUCK, DEMO_DRIVER_PULSE, DEMO_SMALL_DRIVER];

export { DEMO_SMALL_DRIVER };

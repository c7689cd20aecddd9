/** The pulse-scheme tests' coil and the loss of one bridge switch during a pulse, from the loss model's parts. */
import { DEMO_DRIVER_PULSE } from '../../../../shared/demo/drivers.ts';
import { bridgeLossParts, totalLossW } from '../../../../shared/physics/driver/losses.ts';
import type { DriverProfile } from '../../../../shared/schemas/driver.ts';

/** The coil as the pulse driver sees it (invented): 120 kHz, Q 15. */
export const PULSE_COIL = { resonanceHz: 120e3, qualityFactor: 15 };

/** Loss per bridge switch during a pulse of `d` (default the pulse demo, an IGBT: no temperature dependence), W. */
export const pulseLossW = (d: DriverProfile = DEMO_DRIVER_PULSE): number =>
  totalLossW(
    bridgeLossParts(d.devices[0], d.topology, PULSE_COIL.resonanceHz, {
      meanCurrentA: d.fullRailCurrentA,
      meanSquareCurrentA2: d.fullRailCurrentA ** 2,
      meanPowerW: d.supplyVoltageV * d.fullRailCurrentA,
      meanSquareV2: d.supplyVoltageV ** 2,
    }),
    0,
    25,
  );

/**
 * The coil's figures while a person edits its profile: validate, then analyse with the driver's
 * drive figures where the driver validates (shared/physics/coil/drive-context.ts, as the server's
 * coil report). Pure; runs in the browser
 * on every keystroke (a few milliseconds).
 */
import { InputError } from '../errors.ts';
import { analyzeCoil, type CoilDriveContext, type CoilReport } from '../physics/coil/analyze.ts';
import { coilDriveContext } from '../physics/coil/drive-context.ts';
import { parseCoilProfile } from '../schemas/coil.ts';
import { parseDriverProfile, type DriverProfile } from '../schemas/driver.ts';

export interface FieldProblem {
  field: string;
  message: string;
}

export interface LiveFigures {
  report: CoilReport | null;
  coilProblem: FieldProblem | null;
  driverProblem: FieldProblem | null;
}

/** The drive figures the coil model takes from a driver: the same as the server's (drive-context.ts). */
export const driveContextOf: (driver: DriverProfile) => CoilDriveContext = coilDriveContext;

const problemOf = (e: unknown): FieldProblem => {
  if (e instanceof InputError) return { field: e.field ?? '', message: e.message };
  return { field: '', message: e instanceof Error ? e.message : String(e) };
};

/** Report and the first problem of each profile (null where it validates). */
export function liveFigures(coil: unknown, driver: unknown): LiveFigures {
  let drv: DriverProfile | null = null;
  let driverProblem: FieldProblem | null = null;
  if (driver !== null && driver !== undefined) {
    try {
      drv = parseDriverProfile(structuredClone(driver));
    } catch (e) {
      driverProblem = problemOf(e);
    }
  }
  try {
    const profile = parseCoilProfile(coil);
    return { report: analyzeCoil(profile, drv ? driveContextOf(drv) : {}), coilProblem: null, driverProblem };
  } catch (e) {
    return { report: null, coilProblem: problemOf(e), driverProblem };
  }
}

/**
 * Coil and driver profiles as both front doors read them: the command line from JSON files, the
 * server from stored rows. Parsing is the schemas' (shared/schemas/), the coil model is
 * shared/physics/coil/analyze.ts; this file only joins them so every caller words its errors alike.
 */
import { analyzeCoil, type CoilReport } from '../../shared/physics/coil/analyze.ts';
import { coilDriveContext } from '../../shared/physics/coil/drive-context.ts';
import type { CoilAtResonance } from '../../shared/physics/driver/types.ts';
import { type CoilProfile, parseCoilProfile } from '../../shared/schemas/coil.ts';
import { type DriverProfile, parseDriverProfile } from '../../shared/schemas/driver.ts';
import { readJsonFile } from './read-json.ts';

/**
 * The coil report. With the driver, its figures feed the coil's voltage bound and arc reach (and
 * so the keep-out distance): shared/physics/coil/drive-context.ts says which.
 */
export function coilReportFor(profile: CoilProfile, driver?: DriverProfile): CoilReport {
  return driver ? analyzeCoil(profile, coilDriveContext(driver)) : analyzeCoil(profile);
}

/** What the planner needs of the coil: its resonance and Q. */
export const coilAtResonance = (r: CoilReport): CoilAtResonance => ({ resonanceHz: r.resonanceHz, qualityFactor: r.qualityFactor });

/** Reads, validates and models a coil profile file (relative paths against `cwd`). */
export async function loadCoil(path: string, cwd: string, driver?: DriverProfile): Promise<CoilReport> {
  return coilReportFor(await readCoilProfile(path, cwd), driver);
}

/** Reads and validates a coil profile file. */
export async function readCoilProfile(path: string, cwd: string): Promise<CoilProfile> {
  return parseCoilProfile(await readJsonFile(path, cwd, 'coil profile', 'fix the file or start from a demo: coilcue coil --demo desk-lantern --json'));
}

/** Reads and validates a driver profile file. */
export async function loadDriver(path: string, cwd: string): Promise<DriverProfile> {
  return parseDriverProfile(await readJsonFile(path, cwd, 'driver profile', 'fix the file; the README shows a complete driver profile'));
}


/**
 * Every command ends on every error: each command with each class of bad option (bad number,
 * missing value, missing required option, unknown flag, bad choice, missing file, and a file whose
 * content is wrong, found only after the analysis worker has started) runs as a user runs it, in a
 * child process through bin/coilcue.cjs, and must exit 2 with one line on stderr. The entry point's
 * leak check (COILCUE_LEAK_CHECK=1) turns a handle left open into exit 1 and a named line, so a
 * leak fails here instead of hanging. The timeout is generous (a hang, not slowness, is what it catches).
 */
import { spawn } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { encodeWav } from '../../../server/audio/wav.ts';
import { DEMO_COILS } from '../../../shared/demo/coils.ts';
import { DEMO_DRIVER_LINEAR } from '../../../shared/demo/drivers.ts';

const bin = fileURLToPath(new URL('../../../bin/coilcue.cjs', import.meta.url));
const dir = mkdtempSync(join(tmpdir(), 'coilcue-exits-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const tone = new Float32Array(4410).map((_, i) => 0.5 * Math.sin((2 * Math.PI * 440 * i) / 44100));
writeFileSync(join(dir, 'a.wav'), encodeWav({ sampleRate: 44100, channels: [tone] }, { format: 's16' }));
writeFileSync(join(dir, 'notaudio.wav'), 'this is not audio');
writeFileSync(join(dir, 'coil.json'), JSON.stringify(DEMO_COILS['desk-lantern']));
writeFileSync(join(dir, 'driver.json'), JSON.stringify(DEMO_DRIVER_LINEAR));
writeFileSync(join(dir, 'notjson.json'), '{ "name": ');

/** Generous: a hang runs into it; a slow but working exit does not. */
const HANG_MS = 30_000;

function run(args: string[]): Promise<{ code: number | null; signal: string | null; err: string }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [bin, ...args], { cwd: dir, env: { ...process.env, COILCUE_LEAK_CHECK: '1' }, stdio: ['ignore', 'ignore', 'pipe'] });
    let err = '';
    child.stderr.on('data', (d) => (err += d));
    const timer = setTimeout(() => child.kill('SIGKILL'), HANG_MS);
    child.on('close', (code, signal) => {
      clearTimeout(timer);
      resolve({ code, signal, err });
    });
  });
}

const FILES = ['--clip', 'a.wav', '--coil', 'coil.json', '--driver', 'driver.json'];
const OUT = ['--out', 'o.wav'];

/** [command, class of bad option, arguments, what stderr says]. */
const CASES: [string, string, string[], RegExp][] = [
  ['analyze', 'bad number', ['a.wav', '--frame-ms', 'abc'], /--frame-ms must be a number/],
  ['analyze', 'number out of range', ['a.wav', '--frame-ms', '-5'], /--frame-ms must be at least 0\.1/],
  ['analyze', 'missing value', ['a.wav', '--frame-ms'], /--frame-ms needs a value/],
  ['analyze', 'missing required', [], /give <file>/],
  ['analyze', 'unknown flag', ['a.wav', '--bogus'], /unknown option --bogus/],
  ['analyze', 'bad choice', ['a.wav', '--channel', 'centre'], /--channel must be one of mix, left, right/],
  ['analyze', 'missing file', ['nothere.wav'], /cannot read <file> "nothere\.wav" \(no such file\)/],
  ['analyze', 'bad file content', ['notaudio.wav'], /not in a recognised audio format/],
  ['coil', 'bad number', ['coil.json', '--supply-v', 'abc'], /--supply-v must be a number/],
  ['coil', 'missing value', ['coil.json', '--supply-v'], /--supply-v needs a value/],
  ['coil', 'missing required', [], /give exactly one coil profile/],
  ['coil', 'unknown flag', ['coil.json', '--suply-v', '48'], /unknown option --suply-v; did you mean --supply-v\?/],
  ['coil', 'bad choice', ['--demo', 'nowhere'], /--demo must be one of/],
  ['coil', 'missing file', ['nothere.json'], /cannot read <coil\.json> "nothere\.json"/],
  ['coil', 'bad file content', ['notjson.json'], /not valid JSON/],
  ['plan', 'bad number', [...FILES, '--gain-db', 'abc'], /--gain-db must be a number/],
  ['plan', 'bad number', [...FILES, '--margin-k', 'abc'], /--margin-k must be a number/],
  ['plan', 'missing value', [...FILES, '--gain-db'], /--gain-db needs a value/],
  ['plan', 'missing required', ['--clip', 'a.wav', '--coil', 'coil.json'], /missing --driver/],
  ['plan', 'unknown flag', [...FILES, '--gain', '3'], /unknown option --gain; did you mean --gain-db\?/],
  ['plan', 'bad choice', [...FILES, '--channel', 'centre'], /--channel must be one of/],
  ['plan', 'missing file', ['--clip', 'a.wav', '--coil', 'coil.json', '--driver', 'nothere.json'], /cannot read --driver "nothere\.json"/],
  ['plan', 'bad file content', ['--clip', 'a.wav', '--coil', 'coil.json', '--driver', 'notjson.json'], /not valid JSON/],
  ['render', 'bad number', [...FILES, ...OUT, '--gain-db', 'abc'], /--gain-db must be a number/],
  ['render', 'missing value', [...FILES, ...OUT, '--ceiling-dbfs'], /--ceiling-dbfs needs a value/],
  ['render', 'missing required', FILES, /missing --out/],
  ['render', 'unknown flag', [...FILES, ...OUT, '--keep-unsave'], /did you mean --keep-unsafe\?/],
  ['render', 'bad choice', [...FILES, ...OUT, '--format', 'mp3'], /--format must be one of s16, s24, f32/],
  ['render', 'missing file', ['--clip', 'nothere.wav', '--coil', 'coil.json', '--driver', 'driver.json', ...OUT], /cannot read --clip "nothere\.wav"/],
  ['render', 'bad file content', ['--clip', 'notaudio.wav', '--coil', 'coil.json', '--driver', 'driver.json', ...OUT], /not in a recognised audio format/],
  ['preview', 'bad number', [...FILES, ...OUT, '--columns', '1.5'], /--columns must be a whole number/],
  ['preview', 'missing value', [...FILES, ...OUT, '--columns'], /--columns needs a value/],
  ['preview', 'missing required', FILES, /missing --out/],
  ['preview', 'unknown flag', [...FILES, ...OUT, '--colums', '10'], /did you mean --columns\?/],
  ['preview', 'bad choice', [...FILES, ...OUT, '--channel', 'both'], /--channel must be one of/],
  ['preview', 'missing file', ['--clip', 'a.wav', '--coil', 'nothere.json', '--driver', 'driver.json', ...OUT], /cannot read --coil "nothere\.json"/],
  ['preview', 'bad file content', ['--clip', 'a.wav', '--coil', 'notjson.json', '--driver', 'driver.json', ...OUT], /not valid JSON/],
  ['demo', 'missing value', ['--out'], /--out needs a value/],
  ['demo', 'unknown flag', ['--output', 'x'], /did you mean --out\?/],
  ['demo', 'unexpected argument', ['x'], /unexpected argument "x"/],
];

describe('every command exits 2 on every class of bad option, and leaves nothing open', () => {
  it.each(CASES)('%s: %s', async (command, _, args, message) => {
    const r = await run([command, ...args]);
    expect(r.signal, 'killed: the command hung').toBeNull();
    expect(r.err).not.toMatch(/handles left open/);
    expect(r.err).toMatch(message);
    expect(r.err.trim().split('\n')).toHaveLength(1);
    expect(r.code).toBe(2);
  }, HANG_MS + 5_000);

  it('Ctrl-C ends a running command at once with exit code 130', async () => {
    // The demo runs for many seconds (synthesis, analysis, plans): interrupt it once it has started.
    const child = spawn(process.execPath, [bin, 'demo', '--out', 'interrupted'], { cwd: dir, stdio: ['ignore', 'pipe', 'pipe'] });
    let err = '';
    child.stderr.on('data', (d) => (err += d));
    await new Promise<void>((resolve) => child.stdout.once('data', () => resolve()));
    child.kill('SIGINT');
    const timer = setTimeout(() => child.kill('SIGKILL'), HANG_MS);
    const [code, signal] = await new Promise<[number | null, string | null]>((resolve) => child.on('close', (c, s) => resolve([c, s])));
    clearTimeout(timer);
    expect(signal).toBeNull();
    expect(code).toBe(130);
    expect(err).toMatch(/coilcue: interrupted/);
  }, HANG_MS + 5_000);

  it('an unknown command names the nearest one', async () => {
    const r = await run(['pln']);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/unknown command "pln" \(did you mean plan\?\)/);
  });
});

import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

const root = join(import.meta.dirname, '..', '..');

/** Runs a script in a fresh Node process the way the command line starts (tsx's CommonJS hook, then the bundle). */
function child(script: string): Record<string, unknown> {
  const r = spawnSync(process.execPath, ['-e', `require('tsx/cjs/api').register(); require('./server/typebox-bundle.cjs').install(); ${script}`], { cwd: root, encoding: 'utf8' });
  expect(r.status, r.stderr).toBe(0);
  return JSON.parse(r.stdout) as Record<string, unknown>;
}

describe('TypeBox from one bundled file', () => {
  it("exports what TypeBox's own modules export, for each entry point our code imports", () => {
    const out = child(`(async () => {
      const result = {};
      for (const spec of ['typebox', 'typebox/value', 'typebox/compile']) {
        const bundled = require(spec);
        const own = await import(spec); // Node's ES module loader: TypeBox's own files
        result[spec] = { bundled: Object.keys(bundled).filter((k) => k !== '__esModule').sort(), own: Object.keys(own).sort(), esModule: bundled.__esModule };
      }
      result.modulesLoaded = Object.keys(require.cache).filter((k) => k.includes('node_modules/typebox/')).length;
      console.log(JSON.stringify(result));
    })()`);
    for (const spec of ['typebox', 'typebox/value', 'typebox/compile']) {
      const e = out[spec] as { bundled: string[]; own: string[]; esModule: boolean };
      expect(e.bundled).toEqual(e.own);
      expect(e.esModule).toBe(true);
    }
    expect(out.modulesLoaded, 'no TypeBox module loaded one by one through require').toBe(0);
  });

  it('validates a profile through the bundle: a good one passes, a wrong field is named by its dotted path', () => {
    const out = child(`
      const { parseCoilProfile } = require('./shared/schemas/coil.ts');
      const { DEMO_COILS } = require('./shared/demo/coils.ts');
      let bad = null;
      try { parseCoilProfile({ ...DEMO_COILS['desk-lantern'], secondary: { ...DEMO_COILS['desk-lantern'].secondary, turns: -3 } }); } catch (e) { bad = e.message; }
      const ok = parseCoilProfile(DEMO_COILS['desk-lantern']).name;
      console.log(JSON.stringify({ ok, bad, loaded: Object.keys(require.cache).filter((k) => k.startsWith('coilcue-bundled:')) }));
    `);
    expect(out.ok).toBe('desk-lantern');
    expect(String(out.bad)).toMatch(/secondary\.turns/);
    expect(out.loaded).toContain('coilcue-bundled:typebox');
  });
});

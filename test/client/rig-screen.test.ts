// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest';
import '../../client/components/rig-screen.ts';
import type { RigScreen } from '../../client/components/rig-screen.ts';
import type { Coil, Driver } from '../../client/api.ts';
import { DEMO_COILS } from '../../shared/demo/coils.ts';
import { DEMO_DRIVER_LINEAR, DEMO_DRIVER_PULSE } from '../../shared/demo/drivers.ts';
import { analyzeCoil } from '../../shared/physics/coil/analyze.ts';
import { formatSi } from '../../shared/display/format.ts';
import { driveContextOf, liveFigures } from '../../shared/display/live-coil.ts';
import { coilReportFor } from '../../server/services/profiles.ts';

const t = new Date(0).toISOString();
const coils: Coil[] = [{ id: 'c1', name: 'desk-lantern', profile: DEMO_COILS['desk-lantern'], report: analyzeCoil(DEMO_COILS['desk-lantern']), createdAt: t, updatedAt: t }];
const drivers: Driver[] = [
  { id: 'd1', name: DEMO_DRIVER_LINEAR.name, profile: DEMO_DRIVER_LINEAR, createdAt: t, updatedAt: t },
  { id: 'd2', name: DEMO_DRIVER_PULSE.name, profile: DEMO_DRIVER_PULSE, createdAt: t, updatedAt: t },
];

async function mount(driverId = 'd1'): Promise<RigScreen> {
  const el = document.createElement('rig-screen');
  Object.assign(el, { coils, drivers, coilId: 'c1', driverId });
  document.body.append(el);
  await el.updateComplete;
  await el.updateComplete;
  return el;
}

async function type(el: RigScreen, path: string, text: string): Promise<void> {
  const input = el.querySelector<HTMLInputElement>(`profile-form[formid="coil"] [name="${path}"]`)!;
  input.value = text;
  input.dispatchEvent(new Event('input', { bubbles: true }));
  for (let i = 0; i < 3; i++) await el.updateComplete;
}

const resonance = (el: RigScreen) => el.querySelector('[data-figure="resonance"]')!.textContent!.trim();

afterEach(() => {
  document.body.innerHTML = '';
  vi.unstubAllGlobals();
});

describe('live coil figures', () => {
  it('agree with the server-side coil report for the same profile and driver', () => {
    for (const d of [DEMO_DRIVER_LINEAR, DEMO_DRIVER_PULSE]) {
      const live = liveFigures(DEMO_COILS['desk-lantern'], d);
      const server = coilReportFor(DEMO_COILS['desk-lantern'], d);
      // Same code on both sides: equal to rounding (1e-12 relative).
      expect(live.report!.resonanceHz / server.resonanceHz - 1).toBeLessThan(1e-12);
      expect(live.report!.keepOutM).toBe(server.keepOutM);
      expect(driveContextOf(d).supplyVoltageV).toBe(d.supplyVoltageV);
    }
  });

  it('a bad coil field is reported by its dotted path', () => {
    const bad = { ...DEMO_COILS['desk-lantern'], secondary: { ...DEMO_COILS['desk-lantern'].secondary, turns: 5 } };
    const live = liveFigures(bad, DEMO_DRIVER_LINEAR);
    expect(live.report).toBeNull();
    expect(live.coilProblem!.field).toBe('secondary.turns');
  });
});

describe('<rig-screen>', () => {
  it('shows the coil figures computed in the browser, with no call to the server', async () => {
    const fetch = vi.fn();
    vi.stubGlobal('fetch', fetch);
    const el = await mount();
    const expected = analyzeCoil(DEMO_COILS['desk-lantern'], driveContextOf(DEMO_DRIVER_LINEAR));
    expect(resonance(el)).toBe(formatSi(expected.resonanceHz, 'Hz'));
    expect(el.querySelector('[data-figure="modulation corner"]')!.textContent).toBe(formatSi(expected.modulationCornerHz, 'Hz'));
    expect(el.querySelector('[data-figure="keep-out distance"]')!.textContent).toBe(formatSi(expected.keepOutM, 'm'));
    expect(fetch).not.toHaveBeenCalled();
  });

  it('recomputes the resonant frequency as the person types (fewer turns: higher resonance)', async () => {
    const fetch = vi.fn();
    vi.stubGlobal('fetch', fetch);
    const el = await mount();
    const before = resonance(el);
    await type(el, 'secondary.turns', '500');
    const edited = { ...DEMO_COILS['desk-lantern'], secondary: { ...DEMO_COILS['desk-lantern'].secondary, turns: 500 } };
    const expected = analyzeCoil(edited, driveContextOf(DEMO_DRIVER_LINEAR));
    expect(resonance(el)).toBe(formatSi(expected.resonanceHz, 'Hz'));
    expect(resonance(el)).not.toBe(before);
    expect(expected.resonanceHz).toBeGreaterThan(analyzeCoil(DEMO_COILS['desk-lantern']).resonanceHz);
    expect(fetch).not.toHaveBeenCalled();
  });

  it('a profile that does not validate keeps the last figures, marked out of date, names the field and blocks saving', async () => {
    const el = await mount();
    await type(el, 'secondary.wireDiameterM', '0.004'); // 1000 turns of 4 mm do not fit in 0.3 m
    expect(el.querySelector('.figures.stale')).not.toBeNull();
    expect(el.textContent).toContain('Out of date');
    const alert = el.querySelector('section[aria-labelledby="coil-title"] p.bad-word[role="alert"]')!;
    expect(alert.textContent).toMatch(/one layer/);
    const field = el.querySelector<HTMLInputElement>('[name="secondary.turns"]')!;
    expect(field.getAttribute('aria-invalid')).toBe('true');
    const save = [...el.querySelectorAll<HTMLButtonElement>('section[aria-labelledby="coil-title"] button')].find((b) => b.textContent === 'Save')!;
    expect(save.disabled).toBe(true);
  });

  it('the pulse driver feeds the top-voltage bound', async () => {
    const el = await mount('d2');
    const expected = analyzeCoil(DEMO_COILS['desk-lantern'], driveContextOf(DEMO_DRIVER_PULSE));
    expect(expected.voltage.topVoltageBoundV).not.toBeNull();
    expect(el.querySelector('[data-figure="top voltage bound"]')!.textContent).toBe(formatSi(expected.voltage.topVoltageBoundV, 'V'));
  });

  it('Save sends the edited profile to PUT /api/coils/:id', async () => {
    const sent: { url: string; method: string; body: unknown }[] = [];
    vi.stubGlobal('fetch', async (url: string, init: RequestInit) => {
      sent.push({ url, method: init.method!, body: JSON.parse(String(init.body)) });
      return new Response(JSON.stringify({ ...coils[0], profile: JSON.parse(String(init.body)), updatedAt: new Date(1).toISOString() }), { status: 200 });
    });
    const el = await mount();
    await type(el, 'secondary.turns', '900');
    const save = [...el.querySelectorAll<HTMLButtonElement>('section[aria-labelledby="coil-title"] button')].find((b) => b.textContent === 'Save')!;
    const saved = new Promise((r) => el.addEventListener('rig-saved', r, { once: true }));
    save.click();
    await saved;
    expect(sent[0].method).toBe('PUT');
    expect(sent[0].url).toBe('/api/coils/c1');
    expect((sent[0].body as { secondary: { turns: number } }).secondary.turns).toBe(900);
  });
});

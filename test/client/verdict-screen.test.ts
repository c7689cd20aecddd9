// @vitest-environment happy-dom
import { afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import '../../client/components/verdict-screen.ts';
import type { VerdictScreen } from '../../client/components/verdict-screen.ts';
import { planFixture } from './fixtures.ts';

let fx: ReturnType<typeof planFixture>;
const calls: { url: string; body: unknown }[] = [];

beforeAll(() => {
  fx = planFixture();
  vi.stubGlobal('fetch', async (url: string, init?: RequestInit) => {
    const body = init?.body ? JSON.parse(String(init.body)) : undefined;
    calls.push({ url: String(url), body });
    const json = (x: unknown) => new Response(JSON.stringify(x), { status: 200, headers: { 'content-type': 'application/json' } });
    if (String(url).endsWith('/evaluate')) {
      const doc = fx.at((body as { gainDb: number }).gainDb);
      return json({
        document: doc,
        temperatures: { timeS: [0, 1, 2], devices: doc.devices.map((d) => ({ role: d.role, junctionC: [25, 40, d.peakJunctionC], limitC: d.limitC, tjMaxC: d.tjMaxC })) },
      });
    }
    return new Response(JSON.stringify({ status: 404, detail: 'not in this test', code: 'not-found' }), { status: 404 });
  });
});

afterEach(() => {
  document.body.innerHTML = '';
  calls.length = 0;
});

async function settle(el: VerdictScreen): Promise<void> {
  for (let i = 0; i < 20; i++) {
    await new Promise((r) => setTimeout(r, 5));
    await el.updateComplete;
  }
}

async function mount(): Promise<VerdictScreen> {
  const el = document.createElement('verdict-screen');
  el.plan = fx.plan;
  el.clipName = 'swell.wav';
  document.body.append(el);
  await settle(el);
  return el;
}

describe('<verdict-screen>', () => {
  it('puts the advised gain first, in large type, and names the binding limit in words', async () => {
    const el = await mount();
    const doc = fx.plan.document;
    expect(doc.advisedGainDb).not.toBeNull();
    const figure = el.querySelector('.answer-figure')!;
    const sign = doc.advisedGainDb! > 0 ? '+' : '';
    expect(figure.textContent!.trim()).toBe(`${sign}${doc.advisedGainDb!.toFixed(1)} dB`);
    // The answer comes before everything else on the screen.
    expect(el.querySelector('.verdict')!.firstElementChild!.classList.contains('answer')).toBe(true);
    const binding = el.querySelector('.binding')!.textContent!;
    expect(binding).toMatch(/binds/);
    if (doc.binding?.atS != null) expect(el.querySelector('.binding button')!.textContent).toMatch(/^at \d+:\d\d\.\d$/);
  });

  it('asks the server for the advised gain at once, and every limit holds there', async () => {
    const el = await mount();
    const ev = calls.find((c) => c.url.endsWith('/api/plans/plan-1/evaluate'))!;
    expect((ev.body as { gainDb: number }).gainDb).toBe(fx.plan.document.advisedGainDb);
    expect(el.querySelector('.verdict-at-gain')!.getAttribute('data-state')).toBe('ok');
    expect(el.querySelector('.verdict-at-gain')!.textContent).toContain('✓ Every limit holds');
    // One headroom bar per limit, each with a ✓ and words.
    const rows = el.querySelectorAll('.headroom li');
    expect(rows.length).toBe(fx.plan.document.limits.length);
    for (const r of rows) expect(r.textContent).toMatch(/✓.*to spare/s);
  });

  it('moving the gain slider past the advice re-evaluates and the verdict turns to a failure in words', async () => {
    const el = await mount();
    const slider = el.querySelector<HTMLInputElement>('#gain-slider')!;
    const over = Math.min(Number(slider.max), fx.plan.document.advisedGainDb! + 12);
    slider.value = String(over);
    slider.dispatchEvent(new Event('input'));
    await el.updateComplete;
    expect(el.querySelector('.gain-out')!.textContent).toBe(`+${over.toFixed(1)} dB`);
    const gains: number[] = [];
    el.addEventListener('gain-change', (e) => gains.push((e as CustomEvent).detail.gainDb));
    slider.dispatchEvent(new Event('change'));
    await settle(el);
    expect(gains).toEqual([over]);
    const last = calls.filter((c) => c.url.endsWith('/evaluate')).at(-1)!;
    expect((last.body as { gainDb: number }).gainDb).toBe(over);
    const verdict = el.querySelector('.verdict-at-gain')!;
    expect(verdict.getAttribute('data-state')).toBe('over');
    expect(verdict.textContent).toMatch(/✗ At \+\d+\.\d dB:/);
    expect(el.querySelectorAll('.headroom li.over').length).toBeGreaterThan(0);
    // "Back to the advice" returns to the advised gain.
    const back = [...el.querySelectorAll('button')].find((b) => b.textContent!.includes('Back to the advice'))!;
    back.click();
    await settle(el);
    expect(el.querySelector('.verdict-at-gain')!.getAttribute('data-state')).toBe('ok');
  });

  it('shows what to do when there is no plan yet', async () => {
    const el = document.createElement('verdict-screen');
    el.busy = 'Analysing the clip: decoding, 40 %…';
    document.body.append(el);
    await el.updateComplete;
    expect(el.textContent).toContain('Analysing the clip: decoding, 40 %');
  });
});

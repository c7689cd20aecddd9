// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest';
import '../../client/components/set-screen.ts';
import type { SetScreen } from '../../client/components/set-screen.ts';
import type { Clip } from '../../client/api.ts';

const clip = (id: string, name: string): Clip => ({ id, name, sha256: id, sizeBytes: 1, format: 'wav', sampleRate: 44100, channels: 2, durationS: 30, createdAt: '' });
const clips = [clip('a', 'first.wav'), clip('b', 'second.wav'), clip('c', 'third.wav')];

async function mount(): Promise<SetScreen> {
  const el = document.createElement('set-screen');
  Object.assign(el, { clips, coilId: 'c1', driverId: 'd1' });
  el.items = [
    { clipId: 'a', gapAfterS: 30, gainDb: null },
    { clipId: 'b', gapAfterS: 10, gainDb: null },
    { clipId: 'c', gapAfterS: 0, gainDb: null },
  ];
  document.body.append(el);
  await el.updateComplete;
  return el;
}

const order = (el: SetScreen) => [...el.querySelectorAll('.set-item .set-clip')].map((n) => n.textContent!.replace(/^\s*\d+\.\s*/, '').trim());

afterEach(() => {
  document.body.innerHTML = '';
});

describe('<set-screen> ordering', () => {
  it('Up and Down buttons move a clip, carry its gap with it, and keep the keyboard on the moved clip', async () => {
    const el = await mount();
    expect(order(el)).toEqual(['first.wav', 'second.wav', 'third.wav']);
    el.querySelector<HTMLButtonElement>('.set-item[data-index="0"] button[data-move="down"]')!.click();
    await el.updateComplete;
    await el.updateComplete;
    expect(order(el)).toEqual(['second.wav', 'first.wav', 'third.wav']);
    expect(el.items.map((i) => i.gapAfterS)).toEqual([10, 30, 0]);
    expect(document.activeElement).toBe(el.querySelector('.set-item[data-index="1"] button[data-move="down"]'));
    el.querySelector<HTMLButtonElement>('.set-item[data-index="2"] button[data-move="up"]')!.click();
    await el.updateComplete;
    expect(order(el)).toEqual(['second.wav', 'third.wav', 'first.wav']);
  });

  it('the ends cannot move further, and every move button names its clip', async () => {
    const el = await mount();
    expect(el.querySelector<HTMLButtonElement>('.set-item[data-index="0"] button[data-move="up"]')!.disabled).toBe(true);
    expect(el.querySelector<HTMLButtonElement>('.set-item[data-index="2"] button[data-move="down"]')!.disabled).toBe(true);
    expect(el.querySelector('.set-item[data-index="1"] button[data-move="up"]')!.getAttribute('aria-label')).toBe('Move second.wav up');
  });

  it('dropping a dragged clip onto another puts it there', async () => {
    const el = await mount();
    const items = el.querySelectorAll<HTMLElement>('.set-item');
    items[2].dispatchEvent(new Event('dragstart'));
    items[0].dispatchEvent(new Event('drop'));
    await el.updateComplete;
    expect(order(el)).toEqual(['third.wav', 'first.wav', 'second.wav']);
  });

  it('gaps are typed in seconds with their bounds, and a clip can be added and removed', async () => {
    const el = await mount();
    const gap = el.querySelector<HTMLInputElement>('#gap-1')!;
    expect([gap.min, gap.max, gap.nextElementSibling!.textContent]).toEqual(['0', '86400', 's']);
    gap.value = '45';
    gap.dispatchEvent(new Event('input'));
    expect(el.items[1].gapAfterS).toBe(45);
    el.querySelector<HTMLButtonElement>('.set-item[data-index="0"] button[aria-label="Remove first.wav from the set"]')!.click();
    await el.updateComplete;
    expect(order(el)).toEqual(['second.wav', 'third.wav']);
    const add = [...el.querySelectorAll('button')].find((b) => b.textContent === 'Add to the set')!;
    add.click();
    await el.updateComplete;
    expect(order(el)).toEqual(['second.wav', 'third.wav', 'first.wav']);
  });
});

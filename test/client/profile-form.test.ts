// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest';
import Type from 'typebox';
import '../../client/components/profile-form.ts';
import type { ProfileForm } from '../../client/components/profile-form.ts';
import { CoilProfileSchema } from '../../shared/schemas/coil.ts';
import { DriverProfileSchema } from '../../shared/schemas/driver.ts';
import { DEMO_COILS } from '../../shared/demo/coils.ts';
import { DEMO_DRIVER_PULSE } from '../../shared/demo/drivers.ts';
import type { SchemaNode } from '../../shared/display/schema-walk.ts';

async function mount(schema: unknown, value: unknown): Promise<{ form: ProfileForm; changes: { value: Record<string, unknown>; path: string }[] }> {
  const form = document.createElement('profile-form');
  form.schema = schema as SchemaNode;
  form.value = structuredClone(value) as Record<string, unknown>;
  form.formId = 't';
  const changes: { value: Record<string, unknown>; path: string }[] = [];
  form.addEventListener('value-change', (e) => changes.push((e as CustomEvent).detail));
  document.body.append(form);
  await form.updateComplete;
  return { form, changes };
}

const input = (root: Element, path: string) => root.querySelector<HTMLInputElement>(`[name="${path}"]`)!;
async function type(form: ProfileForm, path: string, text: string): Promise<void> {
  const el = input(form, path);
  el.value = text;
  el.dispatchEvent(new Event('input', { bubbles: true }));
  await form.updateComplete;
}

afterEach(() => {
  document.body.innerHTML = '';
});

describe('<profile-form> from the coil schema', () => {
  it('every number has a label, its unit beside it and the schema bounds as input bounds', async () => {
    const { form } = await mount(CoilProfileSchema, DEMO_COILS['desk-lantern']);
    const turns = input(form, 'secondary.turns');
    expect(turns.type).toBe('number');
    expect(turns.min).toBe('10');
    expect(turns.max).toBe('20000');
    expect(turns.step).toBe('1');
    expect(form.querySelector(`label[for="${turns.id}"]`)!.textContent).toBe('turns');
    const form_d = input(form, 'secondary.formDiameterM');
    expect(form_d.min).toBe('0.005');
    expect(form_d.max).toBe('2');
    expect(form_d.value).toBe('0.075');
    expect(form_d.parentElement!.querySelector('.unit')!.textContent).toBe('m');
    // The schema's description is the help text, tied to the input.
    const help = form.querySelector(`#${form_d.getAttribute('aria-describedby')!.split(' ')[0]}`)!;
    expect(help.textContent).toMatch(/outside diameter of the coil former/i);
    // Every input and select on the form has a label.
    for (const el of form.querySelectorAll('input, select, textarea')) {
      expect(form.querySelector(`label[for="${el.id}"]`), el.id).not.toBeNull();
    }
  });

  it('typing a number sends the edited profile up, and the original is not touched', async () => {
    const { form, changes } = await mount(CoilProfileSchema, DEMO_COILS['desk-lantern']);
    await type(form, 'secondary.turns', '800');
    expect(changes.at(-1)!.path).toBe('secondary.turns');
    expect((changes.at(-1)!.value.secondary as { turns: number }).turns).toBe(800);
    expect(DEMO_COILS['desk-lantern'].secondary.turns).toBe(1000);
  });

  it('an out-of-range value is flagged next to the field in words that say what to enter', async () => {
    const { form } = await mount(CoilProfileSchema, DEMO_COILS['desk-lantern']);
    await type(form, 'secondary.formDiameterM', '7');
    const el = input(form, 'secondary.formDiameterM');
    expect(el.getAttribute('aria-invalid')).toBe('true');
    const err = form.querySelector(`#${el.id}-err`)!;
    expect(err.textContent).toContain('Enter a number 0.005 to 2 m');
    await type(form, 'secondary.formDiameterM', '0.1');
    expect(input(form, 'secondary.formDiameterM').getAttribute('aria-invalid')).toBe('false');
  });

  it("shows the owner's validator message at its field", async () => {
    const { form } = await mount(CoilProfileSchema, DEMO_COILS['desk-lantern']);
    form.errorField = 'primary.diameterM';
    form.errorMessage = 'primary.diameterM must exceed the secondary';
    await form.updateComplete;
    const el = input(form, 'primary.diameterM');
    expect(el.getAttribute('aria-invalid')).toBe('true');
    expect(form.querySelector(`#${el.id}-err`)!.textContent).toContain('must exceed the secondary');
  });

  it('switching the top-load shape swaps its fields', async () => {
    const { form, changes } = await mount(CoilProfileSchema, DEMO_COILS['desk-lantern']);
    const shape = form.querySelector<HTMLSelectElement>('#t-topLoad-shape')!;
    shape.value = 'sphere';
    shape.dispatchEvent(new Event('change'));
    await form.updateComplete;
    expect((changes.at(-1)!.value.topLoad as { shape: string }).shape).toBe('sphere');
    expect(input(form, 'topLoad.diameterM')).not.toBeNull();
    expect(form.querySelector('[name="topLoad.outerDiameterM"]')).toBeNull();
  });

  it('an emptied nullable field becomes null (not measured)', async () => {
    const c = { ...DEMO_COILS['desk-lantern'], measured: { resonanceHz: 250000, qualityFactor: null } };
    const { form, changes } = await mount(CoilProfileSchema, c);
    await type(form, 'measured.resonanceHz', '');
    expect((changes.at(-1)!.value.measured as { resonanceHz: unknown }).resonanceHz).toBeNull();
  });
});

describe('<profile-form> from the driver schema', () => {
  it('lists (devices, Foster cells) can grow and shrink within their bounds', async () => {
    const { form, changes } = await mount(DriverProfileSchema, DEMO_DRIVER_PULSE);
    const cells = DEMO_DRIVER_PULSE.devices[0].thermal.foster.length;
    const add = [...form.querySelectorAll('button')].find((b) => b.textContent!.trim() === 'Add to foster')!;
    add.click();
    await form.updateComplete;
    const value = changes.at(-1)!.value as typeof DEMO_DRIVER_PULSE;
    expect(value.devices[0].thermal.foster.length).toBe(cells + 1);
    expect(input(form, `devices.0.thermal.foster.${cells}.tauS`)).not.toBeNull();
  });

  it('choices are menus with the schema literals', async () => {
    const { form } = await mount(DriverProfileSchema, DEMO_DRIVER_PULSE);
    const scheme = form.querySelector<HTMLSelectElement>('[name="scheme"]')!;
    expect([...scheme.options].map((o) => o.value)).toEqual(['rail-linear', 'rail-switched', 'pulse']);
    expect(scheme.value).toBe('pulse');
  });

  it('a field added to the schema appears with its unit and bounds, with no change to the form', async () => {
    const grown = Type.Object({ ...DriverProfileSchema.properties, gateResistanceOhm: Type.Number({ minimum: 0.1, maximum: 100, description: 'gate resistor' }) });
    const { form } = await mount(grown, { ...DEMO_DRIVER_PULSE, gateResistanceOhm: 4.7 });
    const el = input(form, 'gateResistanceOhm');
    expect(el.value).toBe('4.7');
    expect(el.min).toBe('0.1');
    expect(el.parentElement!.querySelector('.unit')!.textContent).toBe('Ω');
  });
});

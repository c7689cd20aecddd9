import { LitElement, html, nothing, type TemplateResult } from 'lit';
import {
  boundsInWords,
  defaultFor,
  describeNode,
  fieldKind,
  getAt,
  isRequired,
  labelOfKey,
  setAt,
  unitOfKey,
  withinBounds,
  type NumberBounds,
  type SchemaNode,
} from '../../shared/display/schema-walk.ts';

/** Help text as a sentence: capitalised, ending in a full stop. */
const sentence = (t: string): string => (t ? `${t[0].toUpperCase()}${t.slice(1)}${/[.!?)]$/.test(t) ? '' : '.'}` : '');

/**
 * <profile-form>: a form generated from a profile's TypeBox schema: every number with its unit
 * beside it, the schema's range as the input's bounds and in words, the schema's description as
 * help text; choices as menus, variants (a top load's shape) as a menu that swaps its fields,
 * lists (devices, Foster cells) with add and remove buttons, optional blocks that can be added
 * and removed. Out-of-range values are flagged next to the field as the person types; the
 * owner's validator may flag one more field (`errorField`, `errorMessage`).
 *
 * Properties: `schema`, `value` (the profile being edited), `errorField`, `errorMessage`,
 *   `formId` (prefix of the inputs' ids, unique on the page), `label`.
 * Events: `value-change` { value, path } on every edit by the person.
 */
export class ProfileForm extends LitElement {
  static override properties = {
    schema: { attribute: false },
    value: { attribute: false },
    errorField: { attribute: false },
    errorMessage: { attribute: false },
    formId: { type: String },
    label: { type: String },
  };

  declare schema: SchemaNode | null;
  declare value: Record<string, unknown> | null;
  declare errorField: string | null;
  declare errorMessage: string | null;
  declare formId: string;
  declare label: string;

  /** Text as typed, by path, so a half-typed number ("0.") is not rewritten under the cursor. */
  private raw = new Map<string, string>();
  private lastEmitted: unknown = null;

  constructor() {
    super();
    this.schema = null;
    this.value = null;
    this.errorField = null;
    this.errorMessage = null;
    this.formId = 'form';
    this.label = 'Profile';
  }

  protected override createRenderRoot(): HTMLElement {
    return this;
  }

  protected override willUpdate(changed: Map<string, unknown>): void {
    if (changed.has('value') && this.value !== this.lastEmitted) this.raw.clear();
  }

  protected override updated(): void {
    // Menus show their value even where the options were rendered after the select.
    for (const sel of this.querySelectorAll<HTMLSelectElement>('select[data-value]')) {
      if (sel.value !== sel.dataset.value) sel.value = sel.dataset.value ?? '';
    }
    // A folded list opens when the validator points into it (it is never folded under the person).
    for (const d of this.querySelectorAll<HTMLDetailsElement>('details[data-path]')) {
      if (this.errorField && (this.errorField === d.dataset.path || this.errorField.startsWith(`${d.dataset.path}.`))) d.open = true;
    }
  }

  private emit(path: string, v: unknown): void {
    const value = setAt(this.value ?? {}, path, v);
    this.lastEmitted = value;
    this.value = value;
    this.dispatchEvent(new CustomEvent('value-change', { detail: { value, path }, bubbles: true, composed: true }));
  }

  private fid(path: string): string {
    return `${this.formId}-${path.replace(/[^A-Za-z0-9]/g, '-')}`;
  }

  override render() {
    if (!this.schema || !this.value) return nothing;
    return html`<div class="profile-form" role="group" aria-label=${this.label}>${this.object(this.schema, '')}</div>`;
  }

  private object(node: SchemaNode, path: string): TemplateResult[] {
    const k = fieldKind(node);
    if (k.kind !== 'object') return [];
    return k.properties.map(([key, sub]) => this.field(sub, path ? `${path}.${key}` : key, key, isRequired(node, key)));
  }

  private field(node: SchemaNode, path: string, key: string, required: boolean): TemplateResult {
    const k = fieldKind(node);
    const v = getAt(this.value, path);
    const absent = v === undefined;
    switch (k.kind) {
      case 'number':
        return this.numberField(node, path, key, required, k.integer, k.nullable, k.bounds);
      case 'text':
        return this.textField(node, path, key, k.long, k.maxLength, required);
      case 'choice':
        return this.choiceField(node, path, key, k.options, required);
      case 'object':
      case 'variants':
      case 'list': {
        if (absent && !required) {
          return html`<div class="optional-block">
            <span>${labelOfKey(key)}: not given${describeNode(node) ? html` <small>(${describeNode(node)})</small>` : nothing}</span>
            <button type="button" @click=${() => this.emit(path, defaultFor(node))}>Add ${labelOfKey(key)}</button>
          </div>`;
        }
        const removable = !required
          ? html`<button type="button" class="quiet" @click=${() => this.emit(path, undefined)}>Remove ${labelOfKey(key)}</button>`
          : nothing;
        if (k.kind === 'object') {
          return html`<fieldset class="group">
            <legend>${labelOfKey(key)}</legend>
            ${describeNode(node) ? html`<p class="help">${describeNode(node)}</p>` : nothing} ${this.object(node, path)} ${removable}
          </fieldset>`;
        }
        if (k.kind === 'variants') {
          const current = String((v as Record<string, unknown> | undefined)?.[k.tag] ?? k.variants[0].value);
          const variant = k.variants.find((x) => x.value === current) ?? k.variants[0];
          const id = this.fid(`${path}.${k.tag}`);
          return html`<fieldset class="group">
            <legend>${labelOfKey(key)}</legend>
            <div class="field">
              <label for=${id}>${labelOfKey(k.tag)}</label>
              <select
                id=${id}
                data-value=${current}
                @change=${(e: Event) => {
                  const next = k.variants.find((x) => x.value === (e.target as HTMLSelectElement).value)!;
                  this.emit(path, defaultFor(next.schema));
                }}
              >
                ${k.variants.map((x) => html`<option value=${x.value} ?selected=${x.value === current}>${x.value}</option>`)}
              </select>
            </div>
            ${this.object(variant.schema, path).slice(1)} ${removable}
          </fieldset>`;
        }
        const items = (Array.isArray(v) ? v : []) as unknown[];
        // A list inside a list item (a device's Foster cells) starts folded, unless it holds an error.
        if (/\.\d+(\.|$)/.test(path)) {
          return html`<details class="nested-list" data-path=${path}>
            <summary>${labelOfKey(key)}: ${items.length} ${items.length === 1 ? 'entry' : 'entries'}</summary>
            ${this.listBody(node, path, key, k, items, removable)}
          </details>`;
        }
        return this.listBody(node, path, key, k, items, removable);
      }
      default:
        return html`<p class="help">${labelOfKey(key)}: edit this field in the exported file.</p>`;
    }
  }

  private listBody(
    node: SchemaNode,
    path: string,
    key: string,
    k: { item: SchemaNode; minItems: number; maxItems: number },
    items: unknown[],
    removable: TemplateResult | typeof nothing,
  ): TemplateResult {
    return html`<fieldset class="group list">
          <legend>${labelOfKey(key)}</legend>
          ${describeNode(node) ? html`<p class="help">${describeNode(node)}</p>` : nothing}
          ${items.map((item, i) => {
            const name = typeof (item as { role?: unknown })?.role === 'string' ? `${labelOfKey(key)} ${i + 1}: ${(item as { role: string }).role}` : `${labelOfKey(key)} ${i + 1}`;
            const itemKind = fieldKind(k.item);
            return html`<fieldset class="group item">
              <legend>${name}</legend>
              ${itemKind.kind === 'object' ? this.object(k.item, `${path}.${i}`) : this.field(k.item, `${path}.${i}`, `${key} ${i + 1}`, true)}
              ${items.length > k.minItems
                ? html`<button type="button" class="quiet" @click=${() => this.emit(path, items.filter((_x, j) => j !== i))}>Remove ${name}</button>`
                : nothing}
            </fieldset>`;
          })}
          ${items.length < k.maxItems
            ? html`<button type="button" @click=${() => this.emit(path, [...items, defaultFor(k.item)])}>Add to ${labelOfKey(key)}</button>`
            : nothing}
          ${this.errorFor(path, [])} ${removable}
        </fieldset>`;
  }

  private errorFor(path: string, own: string[]): TemplateResult | typeof nothing {
    const msgs = [...own];
    if (this.errorField === path && this.errorMessage && !msgs.length) msgs.push(this.errorMessage);
    if (!msgs.length) return nothing;
    return html`<p class="field-error" id=${`${this.fid(path)}-err`} role="alert">✗ ${msgs.join(' ')}</p>`;
  }

  private numberField(
    node: SchemaNode,
    path: string,
    key: string,
    required: boolean,
    integer: boolean,
    nullable: boolean,
    bounds: NumberBounds,
  ): TemplateResult {
    const id = this.fid(path);
    const unit = unitOfKey(key);
    const v = getAt(this.value, path);
    const text = this.raw.get(path) ?? (typeof v === 'number' ? String(v) : '');
    const own: string[] = [];
    const typed = this.raw.get(path);
    const num = typed !== undefined ? (typed.trim() === '' ? null : Number(typed)) : typeof v === 'number' ? v : null;
    if (num === null) {
      if (required && !nullable) own.push(`Give a value${unit ? ` in ${unit}` : ''}.`);
    } else if (!withinBounds(num, bounds, integer)) {
      own.push(`Enter ${integer ? 'a whole number ' : 'a number '}${boundsInWords(bounds)}${unit ? ` ${unit}` : ''}.`);
    }
    const bad = own.length > 0 || this.errorField === path;
    const help = describeNode(node);
    const range = boundsInWords(bounds);
    return html`<div class="field">
      <label for=${id}>${labelOfKey(key)}</label>
      <span class="input-unit">
        <input
          id=${id}
          name=${path}
          type="number"
          inputmode="decimal"
          step=${integer ? '1' : 'any'}
          min=${bounds.min ?? nothing}
          max=${bounds.max ?? nothing}
          .value=${text}
          ?required=${required && !nullable}
          aria-invalid=${bad ? 'true' : 'false'}
          aria-describedby=${`${id}-help${bad ? ` ${id}-err` : ''}`}
          @input=${(e: Event) => {
            const s = (e.target as HTMLInputElement).value;
            this.raw.set(path, s);
            if (s.trim() === '') this.emit(path, nullable ? null : required ? v : undefined);
            else {
              const n = Number(s);
              if (Number.isFinite(n)) this.emit(path, n);
              else this.requestUpdate();
            }
          }}
          @blur=${() => {
            this.raw.delete(path);
            this.requestUpdate();
          }}
        />
        <span class="unit" aria-hidden=${unit ? 'false' : 'true'}>${unit || ' '}</span>
      </span>
      <small class="help" id=${`${id}-help`}>${sentence(help)}${range && !help.includes(range) ? ` Allowed: ${range}${unit ? ` ${unit}` : ''}.` : ''}${nullable ? ' Leave empty if not known.' : ''}</small>
      ${this.errorFor(path, own)}
    </div>`;
  }

  private textField(node: SchemaNode, path: string, key: string, long: boolean, maxLength: number | null, required: boolean): TemplateResult {
    const id = this.fid(path);
    const v = getAt(this.value, path);
    const own: string[] = [];
    if (required && (v === '' || v === undefined)) own.push('Give it a name.');
    const onInput = (e: Event) => {
      const s = (e.target as HTMLInputElement | HTMLTextAreaElement).value;
      this.emit(path, s === '' && !required ? undefined : s);
    };
    return html`<div class="field wide">
      <label for=${id}>${labelOfKey(key)}</label>
      ${long
        ? html`<textarea id=${id} name=${path} rows="2" maxlength=${maxLength ?? nothing} .value=${String(v ?? '')} @input=${onInput}></textarea>`
        : html`<input id=${id} name=${path} type="text" maxlength=${maxLength ?? nothing} .value=${String(v ?? '')} ?required=${required} @input=${onInput} />`}
      <small class="help" id=${`${id}-help`}>${describeNode(node)}</small>
      ${this.errorFor(path, own)}
    </div>`;
  }

  private choiceField(node: SchemaNode, path: string, key: string, options: string[], required: boolean): TemplateResult {
    const id = this.fid(path);
    const v = getAt(this.value, path);
    return html`<div class="field">
      <label for=${id}>${labelOfKey(key)}</label>
      <select
        id=${id}
        name=${path}
        data-value=${v === undefined ? '' : String(v)}
        aria-describedby=${`${id}-help`}
        @change=${(e: Event) => {
          const s = (e.target as HTMLSelectElement).value;
          this.emit(path, s === '' ? undefined : s);
        }}
      >
        ${required ? nothing : html`<option value="" ?selected=${v === undefined}>(not given)</option>`}
        ${options.map((o) => html`<option value=${o} ?selected=${o === v}>${o}</option>`)}
      </select>
      <small class="help" id=${`${id}-help`}>${describeNode(node)}</small>
      ${this.errorFor(path, [])}
    </div>`;
  }
}

customElements.define('profile-form', ProfileForm);

declare global {
  interface HTMLElementTagNameMap {
    'profile-form': ProfileForm;
  }
}

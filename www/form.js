// The parameter form, built from the core's field descriptions (group, label, unit, kind,
// bounds, help): shows a link's field texts, reports edits, and shows each validation message
// next to the field it names. Text only through textContent and value.

const OPEN_GROUPS = new Set(['Run', 'Costs']);

export class ParameterForm {
  /// `onCommit(key, text)` is called when the user finishes editing one field.
  constructor(container, seedInput, schema, onCommit) {
    this.container = container;
    this.schema = schema;
    this.onCommit = onCommit;
    this.inputs = new Map();
    this.units = 'mm';
    this.inputs.set('seed', seedInput);
    seedInput.addEventListener('change', () => onCommit('seed', seedInput.value));
    this.build();
  }

  build() {
    const groups = new Map();
    for (const spec of this.schema) {
      if (spec.key === 'seed') continue;
      if (!groups.has(spec.group)) groups.set(spec.group, []);
      groups.get(spec.group).push(spec);
    }
    for (const [group, specs] of groups) {
      const details = document.createElement('details');
      details.open = OPEN_GROUPS.has(group);
      const summary = document.createElement('summary');
      summary.textContent = group;
      details.append(summary);
      for (const spec of specs) details.append(this.fieldBlock(spec));
      this.container.append(details);
    }
  }

  fieldBlock(spec) {
    const block = document.createElement('div');
    block.className = 'field-block';
    const row = document.createElement('div');
    row.className = 'field-row';
    const id = `param-${spec.key}`;
    const label = document.createElement('label');
    label.htmlFor = id;
    label.textContent = spec.label;
    let input;
    if (spec.kind === 'choice') {
      input = document.createElement('select');
      for (const choice of spec.choices) {
        const option = document.createElement('option');
        option.value = choice;
        option.textContent = choice;
        input.append(option);
      }
    } else if (spec.kind === 'flag') {
      input = document.createElement('input');
      input.type = 'checkbox';
    } else if (['roots', 'polygon', 'polygons', 'levels', 'zones'].includes(spec.kind)) {
      input = document.createElement('textarea');
      input.rows = 2;
      input.spellcheck = false;
    } else if (spec.kind === 'mask') {
      input = document.createElement('input');
      input.readOnly = true;
    } else {
      input = document.createElement('input');
      input.inputMode = spec.kind === 'integer' ? 'numeric' : 'decimal';
      input.autocomplete = 'off';
      if (spec.kind === 'optional_number') input.placeholder = 'none';
    }
    input.id = id;
    input.dataset.key = spec.key;
    input.setAttribute('aria-describedby', `help-${spec.key} error-${spec.key}`);
    input.addEventListener('change', () => this.onCommit(spec.key, this.textOf(spec, input)));
    row.append(label, input);
    const unit = document.createElement('span');
    unit.className = 'unit';
    unit.dataset.unit = spec.unit;
    row.append(unit);
    if (spec.kind === 'mask') {
      const clear = document.createElement('button');
      clear.type = 'button';
      clear.textContent = 'Clear';
      clear.addEventListener('click', () => this.onCommit('mask', 'none'));
      row.append(clear);
    }
    const help = document.createElement('p');
    help.className = 'hint';
    help.id = `help-${spec.key}`;
    // The plain help line; the allowed range shows on hover and in any error message.
    help.textContent = spec.help;
    input.title = `Allowed: ${spec.allowed}.`;
    const error = document.createElement('p');
    error.className = 'field-error';
    error.id = `error-${spec.key}`;
    error.hidden = true;
    block.append(row, help, error);
    this.inputs.set(spec.key, input);
    return block;
  }

  textOf(spec, input) {
    if (spec.kind === 'flag') return input.checked ? 'true' : 'false';
    if (spec.kind === 'optional_number' && input.value.trim() === '') return 'none';
    return input.value;
  }

  /// Shows the texts of every field (`{key: text}`) and the run's length unit.
  show(fields) {
    this.units = fields.units || this.units;
    for (const [key, input] of this.inputs) {
      const text = fields[key] ?? '';
      if (input.type === 'checkbox') input.checked = text === 'true';
      else if (input.placeholder === 'none' && text === 'none') input.value = '';
      else input.value = text;
    }
    for (const unit of this.container.querySelectorAll('.unit')) {
      const name = unit.dataset.unit;
      unit.textContent = name === 'length' ? this.units : name === 'area' ? `${this.units}²` : name;
    }
  }

  /// Marks the form field `field` as wrong with `message` (the core names the field of every
  /// error, e.g. `roots` for `roots[1].x`).
  setError(field, message) {
    const base = field;
    const error = document.getElementById(`error-${base}`);
    const input = this.inputs.get(base);
    if (!error || !input) return false;
    error.textContent = message;
    error.hidden = false;
    input.setAttribute('aria-invalid', 'true');
    const details = input.closest('details');
    if (details) details.open = true;
    return true;
  }

  clearError(field) {
    const base = field;
    const error = document.getElementById(`error-${base}`);
    if (error) {
      error.hidden = true;
      error.textContent = '';
    }
    this.inputs.get(base)?.removeAttribute('aria-invalid');
  }

  clearErrors() {
    for (const key of this.inputs.keys()) this.clearError(key);
  }
}

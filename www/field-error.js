// Doublespar page: one field of a form and the core's errors beside it, for both panels (the
// set-up's controls in app.js and the design panel in design-panel.js).
//
// Contract:
// - `new Field(spec, names)` builds a labelled control with its unit, optional slider, hint and
//   error slot (`row` holds them all; `input`, `range`, `error`, `hintEl`). `spec`: {key, label,
//   spoken, unit, kind ('number' or 'select'), options, slider {min, max, step}, hint, step,
//   value, placeholder, wide, unitColumn}; `key` names the field below an owner whose path
//   changes (a stack card). `names` says which attributes carry the path: {field, error, id}
//   (the set-up's SETUP_NAMES or the design panel's own). `setPath(path, whose)` writes the path
//   into the control, its slider and its error slot (and, with `whose`, a fuller spoken name,
//   "Thickness, element 2"); `value` (a number, or the text as typed so that the core names the
//   field), `blank`, `set(v)`, `setHint(text)`, `syncRange()`.
// - `errorSlot(path, names)` an error slot of its own, for a group of fields.
// - `new FieldErrors({root, names, labelOf, groups})` shows the core's `{field, message}` errors
//   under `root`: `show(err)` (the slot of the path, or of the nearest path above it, down to the
//   panel's general slot for ''; the controls of the path, or of its members where it has none
//   of its own, get aria-invalid), `add(err)` (one more, beside any shown), `clear()`, `shown`,
//   `label(path)` (as the panel names it), `summary(err)` ("Element 2 · Thickness needs
//   attention", for a line that sums up what failed).
// - `toFieldError(e)` gives `{field, message}` (field '' when the core names none) for an error
//   thrown by the core's bindings, and null for anything else (a bug, rethrown by the caller).
//   `nearestErrorSlot(root, attr, path)` finds where a message about `path` is shown
//   (`elements[0].axis.tilt_deg` -> `elements[0].axis` -> `elements[0]` -> `elements` -> ''),
//   taking only slots that are not inside a hidden element. `fieldLabel(path, ownLabel, groups)`
//   names a field as the page labels it ("Element 2 · Thickness"), elements numbered from 1;
//   `labelled(path, message, label)` is the message as shown beside its control.

import { h, numberInput, setAttr, setText, uid } from './dom.js';
import { readNumber, unitWord } from './format.js';

/** The attributes of the set-up's controls: data-field and data-error-for (DEVELOPERS.md). */
export const SETUP_NAMES = { field: 'data-field', error: 'data-error-for', id: 'f' };

// Base steps of the arrow keys in a number field, by unit (Shift ×10, Alt ×0.1; dom.js).
const STEPS = { '°': 1, nm: 1, mm: 0.1, waves: 0.01, '': 0.01 };

/** How a loaded value is written into a text control. */
function asInputText(v) {
  if (v === undefined || v === null) return '';
  if (typeof v === 'number') return String(v);
  if (typeof v === 'string') return v;
  try {
    return JSON.stringify(v);
  } catch {
    return String(v);
  }
}

/** An error slot for a path (set now, or later with setAttribute), hidden while empty. */
export function errorSlot(path, names = SETUP_NAMES) {
  return h('p', { className: 'field-error', [names.error]: path, hidden: true, 'aria-live': 'polite' });
}

export class Field {
  constructor(spec, names = SETUP_NAMES) {
    const { label, spoken, unit, kind = 'number', options, slider, hint, step, value, placeholder, wide = false, unitColumn = false } = spec;
    this.key = spec.key; // the path below its owner, where the owner's path changes (a stack card)
    this.names = names;
    this.kind = kind;
    this.label = label;
    // The spoken name (aria-label) where the visible label needs its group to be told apart.
    this.spoken = spoken ?? label;
    this.unit = unit;
    const id = uid(names.id);
    this.labelEl = h('label', { for: id, text: label });
    this.error = errorSlot(null, names);
    this.error.id = `${id}-err`;
    this.hintEl = h('p', { className: 'hint', id: `${id}-hint`, hidden: !hint, text: hint ?? '' });
    const describedBy = `${id}-err ${id}-hint`;
    const control = h('div', { className: 'control' });
    this.range = null;
    if (kind === 'select') {
      this.input = h('select', { id, 'aria-describedby': describedBy });
      for (const [v, t] of options) this.input.appendChild(h('option', { value: v, text: t }));
      control.appendChild(this.input);
    } else {
      this.input = numberInput(id, { placeholder, 'aria-describedby': describedBy, 'data-step': step ?? STEPS[unit ?? ''] ?? 0.01 });
      control.appendChild(this.input);
      // A unit column (empty where the number has none) lines the fields of a panel up.
      if (unit || unitColumn) control.appendChild(h('span', { className: 'unit', text: unit ?? '', 'aria-hidden': 'true' }));
    }
    this.speak(this.spoken, spoken !== undefined);
    if (value !== undefined) this.input.value = String(value);
    this.row = h('div', { className: `field${slider ? ' has-slider' : ''}${wide ? ' wide' : ''}` }, this.labelEl, control);
    if (slider) {
      const rid = `${id}-range`;
      this.rangeLabel = h('label', { for: rid, className: 'visually-hidden', text: `${this.spoken} slider` });
      this.range = h('input', { id: rid, type: 'range', min: slider.min, max: slider.max, step: slider.step ?? 0.1, 'aria-describedby': `${id}-err` });
      this.row.appendChild(h('div', { className: 'slider' }, this.rangeLabel, this.range));
      this.input.range = this.range;
      this.range.num = this.input;
    }
    this.row.append(this.hintEl, this.error);
  }

  /** The control's spoken name, with its unit; `always` also where it equals the visible label. */
  speak(name, always = true) {
    if (this.kind !== 'select' && this.unit) setAttr(this.input, 'aria-label', `${name} (${unitWord(this.unit)})`);
    else if (always) setAttr(this.input, 'aria-label', name);
  }

  /** Writes `path` into the control, its slider and its error slot; `whose` ("element 2") makes
   *  the spoken names fuller. */
  setPath(path, whose) {
    setAttr(this.input, this.names.field, path);
    setAttr(this.input, 'data-label', this.label);
    if (this.range) setAttr(this.range, this.names.field, path);
    setAttr(this.error, this.names.error, path);
    if (whose !== undefined) {
      const full = `${this.spoken}, ${whose}`;
      this.speak(full);
      if (this.range) setAttr(this.range, 'aria-label', `${full}, slider`);
    }
  }

  get blank() {
    return this.kind !== 'select' && this.input.value.trim() === '';
  }

  /** A number, or the text as typed (so that the core names the field in its message). */
  get value() {
    return this.kind === 'select' ? this.input.value : readNumber(this.input.value);
  }

  /** Writes a loaded value; a choice the list does not know is kept, so that the core can name it. */
  set(v) {
    const text = asInputText(v);
    if (this.kind === 'select') {
      for (const o of this.input.querySelectorAll('option[data-extra]')) {
        if (o.value !== text) o.remove();
      }
      if (![...this.input.options].some((o) => o.value === text)) {
        this.input.appendChild(h('option', { value: text, text: `${text} (unknown)`, 'data-extra': 'true' }));
      }
      if (this.input.value !== text) this.input.value = text;
    } else if (this.input.value !== text) {
      this.input.value = text;
      this.syncRange();
    }
  }

  syncRange() {
    if (!this.range) return;
    const v = readNumber(this.input.value);
    if (typeof v === 'number' && this.range.value !== String(v)) this.range.value = String(v);
  }

  setHint(text) {
    setText(this.hintEl, text ?? '');
    if (this.hintEl.hidden !== !text) this.hintEl.hidden = !text;
  }
}

/** The core's errors beside the controls of one panel (see the contract above). */
export class FieldErrors {
  constructor({ root, names, labelOf, groups }) {
    this.root = root;
    this.names = names;
    this.labelOf = labelOf;
    this.groups = groups;
    this.shown = false;
  }

  /** The field at `path` as the panel labels it: "Element 2 · Thickness", "Band to". */
  label(path) {
    return fieldLabel(path, this.labelOf, this.groups);
  }

  /** "Element 2 · Thickness needs attention" ("the set-up needs attention" for no field). */
  summary(err, whole) {
    return `${err.field ? this.label(err.field) : whole} needs attention`;
  }

  show(err) {
    this.clear();
    this.add(err);
  }

  /** Shows one more message beside its field (several may show at once: a link's bad fields). */
  add(err) {
    this.shown = true;
    const field = err.field;
    const slot = nearestErrorSlot(this.root, this.names.error, field);
    if (slot) {
      const text = labelled(field, err.message, this.label(field));
      slot.textContent = slot.hidden || !slot.textContent ? text : `${slot.textContent} ${text}`;
      slot.setAttribute('data-error-field', field);
      slot.hidden = false;
      openAround(slot);
    }
    if (!field) return;
    const controls = [...this.root.querySelectorAll(`[${this.names.field}]`)];
    const path = (el) => el.getAttribute(this.names.field);
    let marked = controls.filter((el) => path(el) === field);
    if (marked.length === 0) marked = controls.filter((el) => path(el).startsWith(`${field}[`) || path(el).startsWith(`${field}.`));
    for (const el of marked) {
      el.setAttribute('aria-invalid', 'true');
      openAround(el);
    }
  }

  clear() {
    if (!this.shown) return;
    this.shown = false;
    for (const el of this.root.querySelectorAll(`[${this.names.error}]`)) {
      if (!el.hidden) {
        el.hidden = true;
        el.textContent = '';
      }
      el.removeAttribute('data-error-field');
    }
    for (const el of this.root.querySelectorAll(`[${this.names.field}][aria-invalid="true"]`)) el.removeAttribute('aria-invalid');
  }
}

/** Opens the collapsed group (`details`) around `el`, so that a message in it is seen. */
function openAround(el) {
  const d = el.closest('details');
  if (d && !d.open) d.open = true;
}

/** The path one step up; '' above a top-level name, null above ''. */
function parentPath(p) {
  if (!p) return null;
  const m = /^(.*?)(?:\.[^.[\]]*|\[\d+\])$/.exec(p);
  return m ? m[1] : '';
}

export function toFieldError(e) {
  if (e && typeof e === 'object' && !(e instanceof Error) && typeof e.message === 'string') {
    return { field: typeof e.field === 'string' ? e.field : '', message: e.message };
  }
  return null;
}

/**
 * The first element under `root` with `attr` equal to `path` (a trailing '.' dropped) or, where
 * there is none, to the nearest path above it, whose parent lies in no hidden element; null when
 * there is none (not even for '').
 */
export function nearestErrorSlot(root, attr, path) {
  for (let p = path.replace(/\.$/, ''); p !== null; p = parentPath(p)) {
    for (const el of root.querySelectorAll(`[${attr}="${CSS.escape(p)}"]`)) {
      if (!el.parentElement || el.parentElement.closest('[hidden]')) continue;
      return el;
    }
  }
  return null;
}

/** A contract name as words: `thickness_mm` -> `Thickness`, `band_nm[1]` -> `Band`. */
export function humanName(path) {
  const last = path.replace(/(\[\d+\])+$/, '').split('.').pop() ?? '';
  const words = last.replace(/_(mm|nm|deg|waves|um|rad)$/, '').replace(/_/g, ' ').trim();
  return words ? words.charAt(0).toUpperCase() + words.slice(1) : 'Set-up';
}

/**
 * The name of the field at `path` as the page labels it: `ownLabel(path)` (the label of its
 * control, or undefined), else `groups[path]` (names of groups of fields), else its contract name
 * as words. A field of a stack element is prefixed with the element's number counted from 1:
 * `elements[1].thickness_mm` -> `Element 2 · Thickness`.
 */
export function fieldLabel(path, ownLabel, groups = {}) {
  const own = ownLabel(path);
  const el = /^elements\[(\d+)\](?:\.(.+))?$/.exec(path);
  if (el) {
    const head = `Element ${Number(el[1]) + 1}`;
    if (!el[2]) return head;
    return `${head} · ${own ?? groups[`elements[].${el[2]}`] ?? humanName(el[2])}`;
  }
  return own ?? groups[path] ?? humanName(path);
}

/** A message as shown beside its control: `Label: message`, or the message alone for ''. */
export function labelled(path, message, label) {
  return path ? `${label}: ${message}` : message;
}

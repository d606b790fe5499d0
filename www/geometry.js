// Doublespar page: a stack card's version-2 geometry (faces, aperture, mount; contact). A field
// not at its default is always written and shown, so the core names it: nothing entered is
// lost. Changing kind or contact puts values aside; changing back restores them.
// Contract: the class's methods below, and GEOMETRY_GROUPS (DEVELOPERS.md, "Geometry on the page").

import { h, setAttr, setText } from './dom.js';
import { Field, errorSlot } from './field-error.js';

const TILT = { min: 0, max: 89, step: 0.1 };
const AZIMUTH = { min: -180, max: 180, step: 0.1 };
const DIRECTIONS = [['faces.front', 'Front face', 'Normals from +z.'], ['faces.back', 'Back face'], ['mount', 'Mount', 'Turns the whole element.']];

/** Paths with no control of their own. */
export const GEOMETRY_GROUPS = { 'elements[].faces': 'Faces', 'elements[].faces.front': 'Front face', 'elements[].faces.back': 'Back face', 'elements[].mount': 'Mount' };

/** Whether a field's value is not the number 0 (text counts: the core names it). */
const nonZero = (f) => f.value !== 0;

export class CardGeometry {
  constructor() {
    this.dir = {};
    this.slots = { faces: errorSlot(null) };
    const box = {};
    for (const [name, label, hint] of DIRECTIONS) {
      const f = ['tilt', 'azimuth'].map((a, i) => new Field({ key: `${name}.${a}_deg`, label: `${label} ${a}`, unit: '°', slider: i ? AZIMUTH : TILT, hint: i ? undefined : hint }));
      this.dir[name] = f;
      this.slots[name] = errorSlot(null);
      box[name] = [f[0].row, f[1].row, this.slots[name]];
    }
    this.aperture = new Field({ key: 'aperture_mm', label: 'Aperture', unit: 'mm', placeholder: 'none', hint: 'Clear diameter; a wedge needs one.' });
    this.contact = new Field({ key: 'contact', label: 'Contact', kind: 'select', options: [['air', 'air (or a gap)'], ['cement', 'cement'], ['optical', 'optical contact']] });
    this.cement = new Field({ key: 'cement_index', label: 'Cement index', unit: '', step: 0.001, placeholder: '1.55' });
    this.angles = Object.values(this.dir).flat();
    this.fields = [...this.angles, this.aperture, this.contact, this.cement];
    this.summaryText = h('span', { className: 'geometry-summary muted' });
    this.summaryName = h('span', { className: 'visually-hidden' });
    const group = (title, rows) => h('div', { className: 'subgroup' }, h('p', { className: 'subgroup-title', text: title }), ...rows);
    this.details = h('details', { className: 'geometry' },
      h('summary', {}, 'Geometry', this.summaryName, ' ', this.summaryText),
      group('Faces', [...box['faces.front'], ...box['faces.back'], this.slots.faces]),
      this.aperture.row,
      group('Mount', box.mount));
    this.contactBox = h('div', { className: 'contact-fields' }, this.contact.row, this.cement.row);
    this.load({});
  }

  clearPlacement() {
    for (const f of this.angles) f.set(0);
    this.aperture.set('');
  }

  /** `whose` is "element 2". */
  setIndex(p, whose) {
    for (const f of this.fields) f.setPath(`${p}.${f.key}`, whose);
    for (const [name, slot] of Object.entries(this.slots)) setAttr(slot, 'data-error-for', `${p}.${name}`);
    setText(this.summaryName, `, ${whose}`);
  }

  /** Tolerates anything (a bad value stays, to be named). */
  load(obj) {
    this.clearPlacement();
    this.kept = { placement: null, cement: null };
    const member = (o, k) => (o && typeof o === 'object' && !Array.isArray(o) ? o[k] : undefined);
    for (const [name, [tilt, azimuth]] of Object.entries(this.dir)) {
      const d = name.split('.').reduce(member, obj);
      tilt.set(member(d, 'tilt_deg') ?? 0);
      azimuth.set(member(d, 'azimuth_deg') ?? 0);
    }
    this.aperture.set(member(obj, 'aperture_mm') ?? '');
    this.contact.set(member(obj, 'contact') ?? 'air');
    this.cement.set(member(obj, 'cement_index') ?? '');
  }

  tilted(name) {
    return this.dir[name].some(nonZero);
  }

  hasFaces() {
    return this.tilted('faces.front') || this.tilted('faces.back');
  }

  hasPlacement() {
    return this.hasFaces() || !this.aperture.blank || this.tilted('mount');
  }

  /** Adds the fields not at their defaults to element `o`. */
  write(o) {
    const angles = (name) => ({ tilt_deg: this.dir[name][0].value, azimuth_deg: this.dir[name][1].value });
    if (this.hasFaces()) o.faces = { front: angles('faces.front'), back: angles('faces.back') };
    if (!this.aperture.blank) o.aperture_mm = this.aperture.value;
    if (this.tilted('mount')) o.mount = angles('mount');
  }

  writeContact(o) {
    if (this.contact.value !== 'air') o.contact = this.contact.value;
    if (!this.cement.blank) o.cement_index = this.cement.value;
  }

  /** Which rows show for a card of `kind` at `index`; the summary line. */
  sync(kind, index) {
    const show = (el, on) => {
      if (el.hidden !== !on) el.hidden = !on;
    };
    const cement = !this.cement.blank;
    show(this.details, kind === 'crystal' || this.hasPlacement());
    show(this.contactBox, index > 0 || this.contact.value !== 'air' || cement);
    show(this.cement.row, this.contact.value === 'cement' || cement);
    setText(this.summaryText, this.describe());
  }

  /** What the group holds, in one line: "faces 0° / 20° · aperture 10 mm". */
  describe() {
    const num = (f) => (typeof f.value === 'number' ? f.value : '?');
    const parts = [];
    if (this.hasFaces()) parts.push(`faces ${num(this.dir['faces.front'][0])}° / ${num(this.dir['faces.back'][0])}°`);
    if (!this.aperture.blank) parts.push(`aperture ${num(this.aperture)} mm`);
    if (this.tilted('mount')) parts.push(`mounted at ${num(this.dir.mount[0])}°`);
    return parts.join(' · ') || 'faces across the beam';
  }

  /** The user turned the card from `from` into `to`: a crystal's placement is kept aside. */
  kindChanged(from, to) {
    const fields = [...this.angles, this.aperture];
    if (from === 'crystal' && to !== 'crystal' && this.hasPlacement()) {
      this.kept.placement = fields.map((f) => f.input.value);
      this.clearPlacement();
    } else if (to === 'crystal' && this.kept.placement && !this.hasPlacement()) {
      fields.forEach((f, i) => f.set(this.kept.placement[i]));
      this.kept.placement = null;
    }
  }

  /** The user chose a contact: leaving cement keeps its index aside. */
  contactChanged() {
    if (this.contact.value === 'cement') {
      if (this.cement.blank && this.kept.cement !== null) this.cement.set(this.kept.cement);
      this.kept.cement = null;
    } else if (!this.cement.blank) {
      this.kept.cement = this.cement.input.value;
      this.cement.set('');
    }
  }
}

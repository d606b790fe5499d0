// Doublespar page: the geometry of one stack card (contract version 2, CONVENTIONS.md "Geometry
// of an element"): a crystal's faces (front and back normals by tilt and azimuth), its clear
// aperture and its mount, kept in a collapsed "Geometry" group of the card, and for any element
// the contact with the one before it (air, cement with its index, optical).
//
// Nothing entered is lost: a field holding anything but its default is written into the
// element's document whatever the card's kind or place, and its row stays shown, so that the
// core can name it (a mount on a retarder, a contact on the first element) and the user can see
// and clear it. Only a choice the user makes moves values out of the way, and back: turning a
// crystal into an ideal element keeps its geometry aside until it is a crystal again, and
// leaving "cement" keeps its index aside until cement is chosen again.
//
// Contract: `new CardGeometry()`; `contactBox` (the contact and cement rows, placed by the card
// after its gap) and `details` (the geometry group, placed with the crystal's fields); `fields`
// (the Fields, each with `key` below the element's path); `setIndex(path, whose)`; `load(obj)`;
// `write(o)` (adds the fields that differ from their defaults to an element object);
// `isVersion2()`; `sync(kind, index)` (which rows show, the group's one-line summary);
// `kindChanged(from, to)`, `contactChanged()` (after the user's choice). `GEOMETRY_GROUPS`
// names the groups of fields that have no control of their own, for the page's error labels.

import { h, setAttr, setText } from './dom.js';
import { Field, errorSlot } from './field-error.js';

const TILT = { min: 0, max: 89, step: 0.1 };
const AZIMUTH = { min: -180, max: 180, step: 0.1 };

/** Names of geometry paths with no control of their own ("Element 2 · Front face: …"). */
export const GEOMETRY_GROUPS = {
  'elements[].faces': 'Faces',
  'elements[].faces.front': 'Front face',
  'elements[].faces.back': 'Back face',
  'elements[].mount': 'Mount',
};

const CONTACTS = [['air', 'air (or a gap)'], ['cement', 'cement'], ['optical', 'optical contact']];

/** Whether a field's value is not the number 0 (text counts: the core names it). */
const nonZero = (f) => f.value !== 0;

export class CardGeometry {
  constructor() {
    const angle = (key, label, slider, hint) => new Field({ key, label, unit: '°', slider, hint });
    this.frontTilt = angle('faces.front.tilt_deg', 'Front face tilt', TILT, 'Face normals from +z, in the element frame; 0° is a face across the beam.');
    this.frontAzimuth = angle('faces.front.azimuth_deg', 'Front face azimuth', AZIMUTH);
    this.backTilt = angle('faces.back.tilt_deg', 'Back face tilt', TILT, 'A wedge has a tilted back face; equal front and back normals make a tilted plate.');
    this.backAzimuth = angle('faces.back.azimuth_deg', 'Back face azimuth', AZIMUTH);
    this.aperture = new Field({ key: 'aperture_mm', label: 'Aperture', unit: 'mm', placeholder: 'none', hint: 'Clear diameter about the element’s z axis; empty for none. A wedge needs one.' });
    this.mountTilt = angle('mount.tilt_deg', 'Mount tilt', TILT, 'Turns the whole element about its axis point (tilt-tuning, a tilt error).');
    this.mountAzimuth = angle('mount.azimuth_deg', 'Mount azimuth', AZIMUTH);
    this.contact = new Field({ key: 'contact', label: 'Contact', kind: 'select', options: CONTACTS, hint: 'How this element meets the one before it (with no gap).' });
    this.cement = new Field({ key: 'cement_index', label: 'Cement index', unit: '', step: 0.001, placeholder: '1.55' });
    this.placementFields = [this.frontTilt, this.frontAzimuth, this.backTilt, this.backAzimuth, this.aperture, this.mountTilt, this.mountAzimuth];
    this.fields = [...this.placementFields, this.contact, this.cement];

    this.facesError = errorSlot(null);
    this.frontError = errorSlot(null);
    this.backError = errorSlot(null);
    this.mountError = errorSlot(null);
    this.summaryText = h('span', { className: 'geometry-summary muted' });
    this.summaryName = h('span', { className: 'visually-hidden' });
    const group = (title, ...rows) => h('div', { className: 'subgroup' }, h('p', { className: 'subgroup-title', text: title }), ...rows);
    this.details = h('details', { className: 'geometry' },
      h('summary', {}, 'Geometry', this.summaryName, ' ', this.summaryText),
      group('Faces', this.frontTilt.row, this.frontAzimuth.row, this.frontError, this.backTilt.row, this.backAzimuth.row, this.backError, this.facesError),
      this.aperture.row,
      group('Mount', this.mountTilt.row, this.mountAzimuth.row, this.mountError));
    this.contactBox = h('div', { className: 'contact-fields' }, this.contact.row, this.cement.row);

    this.kept = { placement: null, cement: null };
    this.reset();
  }

  /** Every field at its default (version 1's plate, air contact). */
  reset() {
    for (const f of [this.frontTilt, this.frontAzimuth, this.backTilt, this.backAzimuth, this.mountTilt, this.mountAzimuth]) f.set(0);
    this.aperture.set('');
    this.contact.set('air');
    this.cement.set('');
  }

  /** Writes the element's path into the fields and the group slots; `whose` is "element 2". */
  setIndex(p, whose) {
    for (const f of this.fields) f.setPath(`${p}.${f.key}`, whose);
    setAttr(this.facesError, 'data-error-for', `${p}.faces`);
    setAttr(this.frontError, 'data-error-for', `${p}.faces.front`);
    setAttr(this.backError, 'data-error-for', `${p}.faces.back`);
    setAttr(this.mountError, 'data-error-for', `${p}.mount`);
    setText(this.summaryName, `, ${whose}`);
  }

  /** Loads the geometry of an element object, tolerating anything (a bad value stays visible). */
  load(obj) {
    this.reset();
    this.kept = { placement: null, cement: null };
    const member = (o, k) => (o && typeof o === 'object' && !Array.isArray(o) ? o[k] : undefined);
    const faces = member(obj, 'faces');
    if (faces !== undefined) {
      for (const [side, tilt, azimuth] of [['front', this.frontTilt, this.frontAzimuth], ['back', this.backTilt, this.backAzimuth]]) {
        const face = member(faces, side);
        tilt.set(member(face, 'tilt_deg') ?? 0);
        azimuth.set(member(face, 'azimuth_deg') ?? 0);
      }
    }
    if (member(obj, 'aperture_mm') !== undefined) this.aperture.set(obj.aperture_mm);
    const mount = member(obj, 'mount');
    if (mount !== undefined) {
      this.mountTilt.set(member(mount, 'tilt_deg') ?? 0);
      this.mountAzimuth.set(member(mount, 'azimuth_deg') ?? 0);
    }
    if (member(obj, 'contact') !== undefined) this.contact.set(obj.contact);
    if (member(obj, 'cement_index') !== undefined) this.cement.set(obj.cement_index);
  }

  hasFaces() {
    return [this.frontTilt, this.frontAzimuth, this.backTilt, this.backAzimuth].some(nonZero);
  }

  hasMount() {
    return [this.mountTilt, this.mountAzimuth].some(nonZero);
  }

  hasPlacement() {
    return this.hasFaces() || !this.aperture.blank || this.hasMount();
  }

  /** Adds the fields that differ from their defaults to element object `o`, in the contract's order. */
  write(o) {
    if (this.hasFaces()) {
      o.faces = {
        front: { tilt_deg: this.frontTilt.value, azimuth_deg: this.frontAzimuth.value },
        back: { tilt_deg: this.backTilt.value, azimuth_deg: this.backAzimuth.value },
      };
    }
    if (!this.aperture.blank) o.aperture_mm = this.aperture.value;
    if (this.hasMount()) o.mount = { tilt_deg: this.mountTilt.value, azimuth_deg: this.mountAzimuth.value };
    return o;
  }

  /** The contact fields, written after the gap (their place in the contract's documents). */
  writeContact(o) {
    if (this.contact.value !== 'air') o.contact = this.contact.value;
    if (!this.cement.blank) o.cement_index = this.cement.value;
    return o;
  }

  /** Whether this element writes a field of version 2. */
  isVersion2() {
    return this.hasPlacement() || this.contact.value !== 'air' || !this.cement.blank;
  }

  /** Which rows show for a card of `kind` at `index`, and the group's summary line. */
  sync(kind, index) {
    const show = (el, on) => {
      if (el.hidden !== !on) el.hidden = !on;
    };
    show(this.details, kind === 'crystal' || this.hasPlacement());
    const contact = this.contact.value;
    show(this.contactBox, index > 0 || contact !== 'air' || !this.cement.blank);
    show(this.cement.row, contact === 'cement' || !this.cement.blank);
    setText(this.summaryText, this.describe());
  }

  /** One line saying what the group holds: "wedge 20° · aperture 10 mm", "plane-parallel". */
  describe() {
    const num = (f) => (typeof f.value === 'number' ? `${f.value}` : '?');
    const parts = [];
    if (this.hasFaces()) {
      const parallel = this.frontTilt.value === this.backTilt.value && this.frontAzimuth.value === this.backAzimuth.value;
      if (parallel) parts.push(`faces tilted ${num(this.frontTilt)}°`);
      else parts.push(`faces ${num(this.frontTilt)}° / ${num(this.backTilt)}°`);
    }
    if (!this.aperture.blank) parts.push(`aperture ${num(this.aperture)} mm`);
    if (this.hasMount()) parts.push(`mounted at ${num(this.mountTilt)}°`);
    return parts.length ? parts.join(' · ') : 'plane-parallel, faces across the beam';
  }

  /**
   * The user turned the card from `from` into `to`: an ideal element takes no placement, so a
   * crystal's is kept aside, and given back when the card is a crystal again.
   */
  kindChanged(from, to) {
    if (from === to) return;
    if (from === 'crystal' && this.hasPlacement()) {
      this.kept.placement = this.placementFields.map((f) => f.input.value);
      for (const f of [this.frontTilt, this.frontAzimuth, this.backTilt, this.backAzimuth, this.mountTilt, this.mountAzimuth]) f.set(0);
      this.aperture.set('');
    } else if (to === 'crystal' && this.kept.placement && !this.hasPlacement()) {
      this.placementFields.forEach((f, i) => f.set(this.kept.placement[i]));
      this.kept.placement = null;
    }
  }

  /** The user chose a contact: leaving cement keeps its index aside, coming back restores it. */
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

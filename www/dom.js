// Doublespar page: small DOM helpers that the page's modules share. Elements are built with
// createElement and textContent only, never from markup.
//
// Contract: `h(tag, attrs, ...children)` makes an element (attrs: `text` sets textContent,
// `className` the class, `true` an empty attribute; null, undefined and false are left out;
// string children become text nodes); `setText` and `setAttr` write only when the value
// changes; `uid(prefix)` gives an id unique in the page (`prefix-N`); `numberInput(id, attrs)`
// the text input of a number field, whose base step for the arrow keys is `attrs['data-step']`
// (default 1); `stepNumber(ev)` answers ArrowUp / ArrowDown in such a field (Shift ×10,
// Alt ×0.1) and tells the page with an input event, as typing would.

import { readNumber } from './format.js';

let uidCounter = 0;
export function uid(prefix) {
  uidCounter += 1;
  return `${prefix}-${uidCounter}`;
}

export function h(tag, attrs, ...children) {
  const el = document.createElement(tag);
  if (attrs) {
    for (const [k, v] of Object.entries(attrs)) {
      if (v === undefined || v === null || v === false) continue;
      if (k === 'text') el.textContent = v;
      else if (k === 'className') el.className = v;
      else if (v === true) el.setAttribute(k, '');
      else el.setAttribute(k, String(v));
    }
  }
  for (const c of children) {
    if (c === null || c === undefined || c === false) continue;
    el.appendChild(typeof c === 'string' ? document.createTextNode(c) : c);
  }
  return el;
}

export function setText(el, text) {
  if (el.textContent !== text) el.textContent = text;
}

export function setAttr(el, name, value) {
  if (el.getAttribute(name) !== value) el.setAttribute(name, value);
}

/** A text input for a number (class `num`, the decimal keypad, no autocomplete or spell check);
 *  `attrs` as for h, after those. */
export function numberInput(id, attrs) {
  return h('input', { id, type: 'text', className: 'num', inputmode: 'decimal', autocomplete: 'off', spellcheck: 'false', ...attrs });
}

/** Decimals written in a number's shortest text (`0.25` → 2, `1e-7` → 7). */
function decimalsOf(v) {
  const [mantissa, exp] = String(Math.abs(v)).split('e');
  const frac = (mantissa.split('.')[1] ?? '').length;
  return Math.max(0, frac - Number(exp ?? 0));
}

/**
 * A keydown on a number field (`input.num`): ArrowUp adds its step, ArrowDown takes it away;
 * Shift makes the step ten times larger, Alt ten times smaller. The result is rounded to the
 * finer of the value's and the step's decimals (no 0.30000000000000004), written into the field
 * and announced with an `input` event. Returns whether the key was handled; a field holding no
 * number is left alone.
 */
export function stepNumber(ev) {
  const t = ev.target;
  if (!(t instanceof HTMLInputElement) || !t.classList.contains('num') || t.readOnly || t.disabled) return false;
  if ((ev.key !== 'ArrowUp' && ev.key !== 'ArrowDown') || ev.ctrlKey || ev.metaKey) return false;
  const v = readNumber(t.value);
  if (typeof v !== 'number') return false;
  const base = Number(t.dataset.step);
  const step = (Number.isFinite(base) && base > 0 ? base : 1) * (ev.shiftKey ? 10 : 1) * (ev.altKey ? 0.1 : 1);
  const places = Math.min(12, Math.max(decimalsOf(v), decimalsOf(Number(step.toPrecision(12)))));
  const next = Number((v + (ev.key === 'ArrowUp' ? step : -step)).toFixed(places));
  ev.preventDefault();
  t.value = String(Object.is(next, -0) ? 0 : next);
  t.dispatchEvent(new Event('input', { bubbles: true }));
  return true;
}

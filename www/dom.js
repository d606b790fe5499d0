// Doublespar page: small DOM helpers that the page's modules share. Elements are built with
// createElement and textContent only, never from markup.
//
// Contract: `h(tag, attrs, ...children)` makes an element (attrs: `text` sets textContent,
// `className` the class, `true` an empty attribute; null, undefined and false are left out;
// string children become text nodes); `setText` and `setAttr` write only when the value
// changes; `uid(prefix)` gives an id unique in the page (`prefix-N`); `numberInput(id, attrs)`
// the text input of a number field.

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

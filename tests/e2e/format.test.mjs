// The page's number formatting (www/format.js) against the table of cases that the core's
// src/numfmt.rs is tested against too (tests/format/cases.json): the two cannot drift apart.
// Plain Node, no browser: format.js is a module without DOM access.

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import {
  fixed, fmt, lengthIn, lengthUnit, lengthUnitFor, MAX_DRAWN_CHARS, power, showsAzimuth, sig, tick,
} from '../../www/format.js';

const table = JSON.parse(readFileSync(new URL('../format/cases.json', import.meta.url), 'utf8'));

function valueOf(v) {
  if (v === 'NaN') return NaN;
  if (v === 'Infinity') return Infinity;
  if (v === '-Infinity') return -Infinity;
  if (v === '-0') return -0;
  return v;
}

test('format.js gives every shared case exactly as the core does', () => {
  let n = 0;
  for (const c of table.cases) {
    const v = valueOf(c.value);
    const digits = c.digits ?? 3;
    let got;
    switch (c.kind) {
      case 'sig': got = sig(v, digits); break;
      case 'fixed': got = fixed(v, digits, c.floor ?? 0); break;
      case 'tick': got = tick(v, c.step); break;
      case 'length': got = lengthIn(v, c.unit === 'auto' ? lengthUnitFor(v) : lengthUnit(c.unit), digits); break;
      case 'unit_for': got = lengthUnitFor(v).symbol; break;
      case 'power': got = power(v, digits); break;
      case 'shows_azimuth': got = String(showsAzimuth(v)); break;
      default: assert.fail(`unknown kind ${c.kind}`);
    }
    assert.equal(got, c.expected, JSON.stringify(c));
    n += 1;
  }
  assert.ok(n >= 40, `${n} cases`);
});

test('no number the page formats is longer than the budget', () => {
  const awkward = [1e308, -1.7976931348623157e308, 5e-324, 1.23e-11, -9.996e-5, 0.00012345, 999999.6,
    12345678.9, -0, 1, 6.189372512, 1e-300, 123456789012, -2.5e-17, 0.99996, 4.2e21];
  const body = (s) => [...s.replace(/^[\u2212-]/, '').replace(/ .*$/, '').replace(/°$/, '')].length;
  for (const v of awkward) {
    for (let n = 1; n <= 8; n += 1) {
      assert.ok(body(sig(v, n)) <= MAX_DRAWN_CHARS, `sig(${v}, ${n}) = ${sig(v, n)}`);
      assert.ok(body(fixed(v, n)) <= MAX_DRAWN_CHARS, `fixed(${v}, ${n}) = ${fixed(v, n)}`);
    }
    for (const k of ['index', 'deg', 'ellipseDeg', 'mm', 'power', 'rad', 'waves', 'dop']) {
      assert.ok(body(fmt[k](v)) <= MAX_DRAWN_CHARS, `fmt.${k}(${v}) = ${fmt[k](v)}`);
    }
  }
});

// Doublespar page: the core's errors, `{field, message}`, as the page's modules handle them.
//
// Contract: `toFieldError(e)` gives `{field, message}` (field '' when the core names none) for
// an error thrown by the core's bindings, and null for anything else (a bug, rethrown by the
// caller). `nearestErrorSlot(root, attr, path, skip)` finds where a message about `path` is
// shown: the error slot `[attr="<path>"]` under `root`, or else that of the nearest path above it
// (`elements[0].axis.tilt_deg` -> `elements[0].axis` -> `elements[0]` -> `elements` -> ''),
// taking only slots that are not inside a hidden element. `fieldLabel(path, ownLabel, groups)`
// names a field as the page labels it ("Element 2 · Thickness"), elements numbered from 1;
// `labelled(path, message, label)` is the message as shown beside its control.

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
 * there is none, to the nearest path above it, whose parent lies in no hidden element and which
 * `skip(el)` does not leave out; null when there is none (not even for '').
 */
export function nearestErrorSlot(root, attr, path, skip = () => false) {
  for (let p = path.replace(/\.$/, ''); p !== null; p = parentPath(p)) {
    for (const el of root.querySelectorAll(`[${attr}="${CSS.escape(p)}"]`)) {
      if (skip(el)) continue;
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

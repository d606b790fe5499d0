// Doublespar page: the core's errors, `{field, message}`, as the page's modules handle them.
//
// Contract: `toFieldError(e)` gives `{field, message}` (field '' when the core names none) for
// an error thrown by the core's bindings, and null for anything else (a bug, rethrown by the
// caller); `parentPath(p)` is the path one step up (`elements[0].axis.tilt_deg` ->
// `elements[0].axis` -> `elements[0]` -> `elements` -> ''), null above ''. A message is shown at
// the nearest of these paths that has a visible error slot.

export function parentPath(p) {
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

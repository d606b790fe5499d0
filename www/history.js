// Doublespar page: the set-up's history, kept in the browser's own history so that Undo and
// Redo, the browser's Back and Forward, and the address always agree. Every committed set-up is
// one history entry (history.pushState) whose state holds the scenario's text, where the set-up
// came from (its origin: demo, preset, file, link, designed part) and whether it was edited
// since; a run of edits to one control (a slider dragged, a number typed) is one entry, updated
// in place (history.replaceState, at most four times a second). Undo is history.back(), Redo
// history.forward(); the page restores what an entry holds when the browser says so (popstate),
// without pushing anything.
//
// Contract: new SetupHistory({href, restore, changed}) with `href(entry)` the address of an
// entry (its fragment), `restore(entry)` called on Back, Forward, Undo or Redo with the entry
// to show, and `changed()` called whenever what can be undone or redone may have changed.
// start(entry), push(entry), replace(entry, {now}), adopt(entry), flush(), undo(), redo(),
// canUndo, canRedo, current. An entry is {text, origin: {kind, name}, edited, design}; `index`
// and `top` are added here (its place, and the last place pushed when it was written).

const STATE_TAG = 'doublespar-setup';
const REPLACE_INTERVAL_MS = 250; // at most four address updates a second while dragging

export class SetupHistory {
  constructor({ href, restore, changed }) {
    this.href = href;
    this.restore = restore;
    this.changed = changed;
    this.entry = null;
    this.top = 0;
    this.timer = 0;
    this.lastWrite = -Infinity;
    window.addEventListener('popstate', (ev) => this.onPop(ev.state));
  }

  /** The entry on screen (null before start). */
  get current() {
    return this.entry;
  }

  get canUndo() {
    return !!this.entry && this.entry.index > 0;
  }

  get canRedo() {
    return !!this.entry && this.entry.index < this.top;
  }

  /** Whether `state` is one of this page's entries. */
  static owns(state) {
    return !!state && typeof state === 'object' && state.tag === STATE_TAG && typeof state.text === 'string';
  }

  /**
   * The first entry of this visit: the browser's current entry gets its state, and its address
   * stays as it came (a link that could not be loaded stays there until the first edit). A
   * reload keeps its place (and what Forward still holds) when the entry it finds is one of ours
   * for the same text.
   */
  start(entry) {
    const old = history.state;
    const keep = SetupHistory.owns(old) && old.text === entry.text;
    const index = keep ? old.index : 0;
    this.top = keep ? Math.max(old.top ?? index, index) : 0;
    this.entry = { ...entry, origin: keep ? old.origin : entry.origin, edited: keep ? old.edited : entry.edited, index };
    this.write(false, true);
  }

  /** A new step: after the entry on screen, dropping whatever Forward held. */
  push(entry) {
    this.next(entry, true);
  }

  /** The same step, changed (a drag or typing goes on); written now or within the interval. */
  replace(entry, { now = false } = {}) {
    this.entry = { ...entry, index: this.entry ? this.entry.index : 0 };
    if (now) {
      this.flush();
      this.write(false);
      return;
    }
    if (this.timer) return;
    const wait = REPLACE_INTERVAL_MS - (performance.now() - this.lastWrite);
    if (wait <= 0) this.write(false);
    else this.timer = setTimeout(() => this.write(false), wait);
  }

  /**
   * A step the browser has already made (the address's fragment was changed by hand or by a
   * link): its entry, which holds no state yet, becomes the step after the one on screen.
   */
  adopt(entry) {
    this.next(entry, false);
  }

  /** The step after the one on screen, in a new entry (`push`) or in the browser's current one. */
  next(entry, push) {
    this.flush();
    const index = this.entry ? this.entry.index + 1 : 0;
    this.top = index;
    this.entry = { ...entry, index };
    this.write(push);
  }

  /** Writes a pending replace now. */
  flush() {
    if (!this.timer) return;
    clearTimeout(this.timer);
    this.write(false);
  }

  undo() {
    if (!this.canUndo) return false;
    this.flush();
    history.back();
    return true;
  }

  redo() {
    if (!this.canRedo) return false;
    this.flush();
    history.forward();
    return true;
  }

  write(push, keepAddress = false) {
    this.timer = 0;
    this.lastWrite = performance.now();
    const state = { ...this.entry, tag: STATE_TAG, top: this.top };
    const url = keepAddress ? location.href : `${location.pathname}${location.search}${this.href(this.entry)}`;
    if (push) history.pushState(state, '', url);
    else history.replaceState(state, '', url);
    this.changed();
  }

  onPop(state) {
    // A fragment typed or followed by hand has no state of ours: the page's hashchange
    // handler loads it (and adopts the entry).
    if (!SetupHistory.owns(state)) return;
    if (this.timer) {
      clearTimeout(this.timer);
      this.timer = 0;
    }
    this.entry = { ...state };
    delete this.entry.tag;
    delete this.entry.top;
    this.top = Math.max(this.top, state.index);
    this.restore(this.entry);
    this.changed();
  }
}

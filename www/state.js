// Doublespar page: the page's state, in one object. app.js creates it once (createState) and
// hands it to the modules that need it (setupResults, setupViews, setupExport, setupDesign);
// they read and write its fields instead of keeping variables of their own, and every function
// of theirs that needs it takes it as its first parameter. Tables that never change stay as
// constants in their modules; dom.js's counter of element ids is the one variable left outside
// (ids unique in the document, not state of the page).
//
// Contract: `createState({darkQuery})` returns the object below, every field documented where
// it is made; `materialName(state, key)` names a material of the catalogue as every list and
// description of the page names it.

export function createState({ darkQuery }) {
  return {
    // --- the core (filled by main once the bindings have loaded) ---------------------------
    core: null, // the bindings module (pkg/doublespar.js)
    session: null, // the core's Session: the last good scenario and its trace
    materialList: [], // core.materials(): [{key, name, sign, range_nm, citation, verified, …}]
    viewList: [], // core.viewNames(): the views the core can draw
    presets: [], // core.presets(): [{key, name, scenario}], the documents of examples/
    darkQuery, // the (prefers-color-scheme: dark) media query

    // --- the set-up's controls (app.js) ------------------------------------------------------
    controls: {}, // contract path -> Field, for the controls above the stack
    cards: [], // the stack's cards, in the order of the elements
    polarizationParts: {}, // polarization kind -> the rows and groups shown for it
    polarizationAll: [], // every row or group that shows for some kinds only
    errors: null, // FieldErrors of the set-up's controls (field-error.js)

    // --- tracing (app.js) --------------------------------------------------------------------
    result: null, // the result on screen (the last scenario that traced)
    scenario: null, // that scenario, as the controls say it
    lastGoodText: null, // its JSON text, as it travels in the link and the history
    lastAttempt: null, // the text last handed to the core, traced or not (no second try)
    framePending: false, // an edit waits for its animation frame to be traced

    // --- the history, the link and files (app.js, history.js) -------------------------------
    history: null, // the SetupHistory
    editGroup: null, // the control whose run of edits is one step (a drag, typing), until its change event
    pendingEdit: null, // what the next commit records: a control's path or a structural action
    pendingEnd: false, // a change event (the run's end) came before the commit that records the run
    designText: '', // the design panel's inputs as they travel in the link ('' at their defaults)
    fileToken: 0, // counts the files chosen, so that a slow read of an earlier one loses

    // --- the results as text (results.js) ----------------------------------------------------
    results: {
      shape: null, // what the rows were built for: element kinds, ray labels, spot count, show-all
      cells: [], // {el, get, format, keyOf, last}: every shown number
      warnings: null, // the warnings shown, as one text
      showAll: { rays: false, spots: false }, // whether the long tables show every row
      units: { rays: null, spots: null, screen: null }, // the length unit of each table (screen: the rays' screen positions), chosen at each render
    },

    // --- the views (views.js) ----------------------------------------------------------------
    views: {
      list: [], // {name, canvas, box, failed}; the side view's canvas data-view is its plane's view
      errors: new Map(), // view name -> message, for a view that could not be drawn
      dirty: new Set(), // views resized since the last frame
      resizeFrame: 0, // the animation frame that redraws them, 0 when none is due
      printDark: false, // drawn in the light palette for printing, to go back to dark after
    },

    // --- the convergent-light views (convergent.js) -------------------------------------------
    convergent: {
      worker: null, // the worker that computes their maps (design-worker.js), started when first opened
      nextId: 0, // the id of the last request posted to it
      busy: null, // the request in flight: {id, text (the scenario's JSON text), posted (ms)}
      again: false, // the scenario changed while it was in flight: ask again when it ends
      have: new Set(), // 'view scenario-text' of each map the session holds
      ms: {}, // view -> ms from posting the last request to the view drawn
      drawByName: null, // redraws one view (views.js)
    },

    // --- the design panel (design-panel.js) ------------------------------------------------
    design: {
      hooks: null, // what setupDesign returns: setDesignInputs, designLinkError, designRequest, designShown
      links: null, // what the panel may do to the page: applyScenario, flushFragment, onDesignInputs
      limits: null, // core.designLimits(): sample defaults and limits (displacer, splitter), the recombiner's limits, the rotator's tolerances
      fields: {}, // request path -> Field (also `size`: how a tilt-tuned plate is given, no request field)
      layout: {}, // kind -> the rows and groups shown for it, in order
      hints: {}, // kind -> {path or group: hint text, start: {path: starting value of an untouched field}}
      bandBox: null, // the band's group (its hint depends on the kind)
      tolBox: null, // the tolerances' group (its rows and hint depend on the kind)
      mediumBoxes: [], // [prefix, custom-indices box, principal-indices box] of each material choice
      errors: null, // FieldErrors of the panel
      defaultRequestText: '', // the request of the fields as the panel starts
      worker: null, // the design worker (design-worker.js)
      nextId: 1, // the id of the next request posted to it
      active: null, // the request under way: {id, request, t0, nominal, done, total}
      shown: null, // the design on screen: {request, design, complete, run: {done, total, cancelled} | null}
      lastMs: 0, // how long the last solve took
      plots: [], // {name, canvas, box, draw(dark)}: the plots shown
      resize: null, // the ResizeObserver that redraws them
    },
  };
}

/**
 * The catalogue of nematics (src/optics/lc/catalogue.rs, `NEMATICS`): key and name, for the stack
 * editor's and the design panel's lists (tests/www_source.rs checks that it offers every key).
 */
export const NEMATICS = [
  ['5cb', '5CB (4-cyano-4′-pentylbiphenyl)'],
  ['5pch', '5PCH (trans-4-(4-pentylcyclohexyl)benzonitrile)'],
];

/**
 * A material's name as the page writes it. A formula with no journal source (`verified` false)
 * is named with "(unverified data)", so that every list and description that names it says so.
 */
export function materialName(state, key) {
  const m = state.materialList.find((x) => x.key === key);
  if (!m) return key;
  return m.verified === false ? `${m.name} (unverified data)` : m.name;
}

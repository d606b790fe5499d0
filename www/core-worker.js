// Doublespar page: the one place that starts a worker on the design build of the core
// (design-worker.js, which loads pkg-design/). The design panel runs its requests in one such
// worker and the convergent-light views compute their maps in another, so that a long design run
// never holds up the figure nor the figure a design run. The single offline file rewrites this
// one line to start its worker from inline code (scripts/build-single.mjs).

/** A new worker on the design build of the core (a module worker). */
export function startCoreWorker() {
  return new Worker('design-worker.js', { type: 'module' });
}

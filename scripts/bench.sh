#!/usr/bin/env bash
# Every benchmark in one run, side by side on this machine, with the ratios: the native core
# (cargo bench --bench core), the numpy baselines of the same sweep, of the two-wedge
# splitter's traces (scripts/bench/splitter_numpy.py), of a five-stage filter's spectrum
# (scripts/bench/spectrum_numpy.py) and of a liquid-crystal cell's 200-voltage retardance curve
# (scripts/bench/lc_numpy.py), the same work in WebAssembly under Node, a 256 × 256
# conoscopic figure natively, under Node and in numpy (benches/conoscope.rs,
# scripts/bench/wasm_conoscope.mjs, scripts/bench/conoscope_numpy.py; their checksums must agree),
# and the page in headless Chromium (scripts/bench-web.mjs: recompute and redraw,
# first complete render, wasm size, the design worker's Monte Carlo run; and
# scripts/bench/browser_splitter.mjs: the splitter's whole traces by the design worker's build in
# the page, the engine it runs in there). Ends with a summary.
# Figures are reported, never asserted, except the page's two budgets (first render, wasm size),
# whose excess makes the exit status 1 as it does in scripts/test.sh.
# numpy is installed into the venv under target/ (as the reference tests do).
# Usage: scripts/bench.sh [--no-page]
set -euo pipefail
cd "$(dirname "$0")/.."
page=1
[ "${1:-}" = --no-page ] && page=0
venv=target/refenv
[ -x "$venv/bin/python" ] || python3 -m venv "$venv"
"$venv/bin/python" -c "import numpy" 2>/dev/null || "$venv/bin/python" -m pip install --quiet numpy
scripts/build-web.sh >/dev/null
native_out=$(cargo bench --quiet --bench core 2>/dev/null)
echo "$native_out"
native=$(printf '%s\n' "$native_out" | tail -1)
# OPENBLAS_* slow numpy down on some processors here; unset for this command only.
baseline=$(env -u OPENBLAS_CORETYPE -u OPENBLAS_L2_SIZE "$venv/bin/python" scripts/bench/walkoff_numpy.py)
echo "$baseline"
splitter_baseline=$(env -u OPENBLAS_CORETYPE -u OPENBLAS_L2_SIZE "$venv/bin/python" scripts/bench/splitter_numpy.py)
echo "$splitter_baseline"
spectrum_baseline=$(env -u OPENBLAS_CORETYPE -u OPENBLAS_L2_SIZE "$venv/bin/python" scripts/bench/spectrum_numpy.py)
echo "$spectrum_baseline"
lc_baseline=$(env -u OPENBLAS_CORETYPE -u OPENBLAS_L2_SIZE "$venv/bin/python" scripts/bench/lc_numpy.py)
echo "$lc_baseline"
wasm=$(node scripts/bench/wasm_sweep.mjs)
echo "$wasm"
# Convergent light: a 256 × 256 conoscopic figure natively and in WebAssembly under Node
# (reported beside the rest; checksums printed by each).
conoscope_out=$(cargo bench --quiet --bench conoscope 2>/dev/null)
echo "$conoscope_out"
conoscope_native=$(printf '%s\n' "$conoscope_out" | tail -1)
conoscope_wasm=$(node scripts/bench/wasm_conoscope.mjs)
echo "$conoscope_wasm"
conoscope_baseline=$(env -u OPENBLAS_CORETYPE -u OPENBLAS_L2_SIZE "$venv/bin/python" scripts/bench/conoscope_numpy.py)
echo "$conoscope_baseline"
web='{}'
browser='{}'
status=0
if [ "$page" = 1 ]; then
  if [ ! -d tests/e2e/node_modules/playwright-core ]; then
    (cd tests/e2e && npm ci --no-audit --no-fund --loglevel=error)
  fi
  browser=$(node scripts/bench/browser_splitter.mjs)
  echo "$browser"
  web_out=$(node scripts/bench-web.mjs) || status=$?
  echo "$web_out"
  web=$(printf '%s\n' "$web_out" | tail -1)
  case "$web" in \{*) ;; *) web='{}' ;; esac
fi
echo
python3 - "$native" "$baseline" "$wasm" "$web" "$splitter_baseline" "$spectrum_baseline" "$lc_baseline" "$conoscope_native" "$conoscope_wasm" "$conoscope_baseline" "$browser" <<'PY'
import json, sys
n, b, w, p, sb, spb, lcb, cn, cw, cb, bw = (json.loads(a) for a in sys.argv[1:12])
assert abs(n["spectrum_checksum"] - spb["spectrum_checksum"]) < 1e-9 * abs(spb["spectrum_checksum"]), "native and numpy spectra disagree"
assert abs(n["lc_curve_checksum"] - lcb["lc_curve_checksum"]) < 1e-9 * abs(lcb["lc_curve_checksum"]), f"native and numpy retardance curves disagree: {n['lc_curve_checksum']} vs {lcb['lc_curve_checksum']}"
for other, what in ((cw, "wasm"), (cb, "numpy")):
    assert abs(cn["conoscope_checksum"] - other["conoscope_checksum"]) < 1e-9 * abs(other["conoscope_checksum"]), f"native and {what} conoscopic figures disagree"
assert abs(n["splitter_lane_trace_checksum"] - sb["splitter_trace_checksum"]) < 1e-9 * abs(sb["splitter_trace_checksum"]), "native lanes and numpy disagree on the whole traces"
for key in ("splitter_trace_checksum", "splitter_split_checksum"):
    assert abs(n[key] - sb[key]) < 1e-9 * abs(sb[key]), f"native and numpy disagree on {key}: {n[key]} vs {sb[key]}"
    assert abs(n[key] - w[key]) < 1e-9 * abs(w[key]), f"native and wasm disagree on {key}"
assert abs(n["splitter_trace_checksum"] - w["splitter_trace_each_checksum"]) < 1e-9 * abs(w["splitter_trace_each_checksum"]), "native and wasm one by one disagree on the whole traces"
assert abs(n["walkoff_sweep_checksum"] - b["walkoff_sweep_checksum"]) < 1e-6 * abs(b["walkoff_sweep_checksum"]), "the two sweeps disagree"
assert abs(n["walkoff_sweep_checksum"] - w["walkoff_sweep_checksum"]) < 1e-9 * abs(w["walkoff_sweep_checksum"]), "native and wasm sweeps disagree"
one, two, base = n["walkoff_sweep_one_thread_1e6_ms"], n["walkoff_sweep_1e6_ms"], b["walkoff_sweep_1e6_ms"]
print("summary")
print(f"  native trace, three crystals and eight rays: {n['trace_per_s']:.0f} traces/s")
for label, ms in (("2 threads", two), ("one thread", one)):
    print(f"  walk-off sweep, 10^6 points: native on {label} {ms:.2f} ms, numpy {base:.2f} ms: native is {base / ms:.1f}x as fast (target 5x)")
wm = w["walkoff_sweep_1e6_ms"]
print(f"  walk-off sweep, 10^6 points, one thread: WebAssembly under Node {wm:.2f} ms, native {one:.2f} ms: wasm takes {wm / one:.2f}x the native time (target within 2x)")
print(f"  Monte Carlo, displacer, 10^5 samples, native: {n['monte_carlo_1e5_ms']:.1f} ms")
for label, key, threads_key in (("whole traces (4 rays, fields and powers)", "splitter_trace_1e5_ms", "splitter_trace_threads_1e5_ms"), ("split angles by wave-vector chains", "splitter_split_1e5_ms", "splitter_split_threads_1e5_ms")):
    nn, nt, ww, bb = n[key], n[threads_key], w[key], sb[key]
    print(f"  two-wedge splitter, 10^5 {label}: native on {n['splitter_threads']} threads {nt:.1f} ms ({1e5 / nt * 1e3:.0f}/s), on one {nn:.1f} ms ({1e5 / nn * 1e3:.0f}/s), wasm (one thread) {ww:.1f} ms ({1e5 / ww * 1e3:.0f}/s), numpy {bb:.1f} ms ({1e5 / bb * 1e3:.0f}/s): native {bb / nt:.1f}x on {n['splitter_threads']} threads, {bb / nn:.1f}x on one, wasm {bb / ww:.1f}x numpy (target 20x)")
ln1, lnt, bb = n["splitter_lane_trace_1e5_ms"], n["splitter_lane_trace_threads_1e5_ms"], sb["splitter_trace_1e5_ms"]
print(f"  two-wedge splitter, 10^5 whole traces in lanes (blocks of incidences side by side; {n['splitter_lane_trace_alone']} samples traced one by one): native on {n['splitter_threads']} threads {lnt:.1f} ms ({1e5 / lnt * 1e3:.0f}/s), on one {ln1:.1f} ms ({1e5 / ln1 * 1e3:.0f}/s), numpy {bb:.1f} ms: native {bb / lnt:.1f}x on {n['splitter_threads']} threads, {bb / ln1:.1f}x on one (target 20x); wasm (one thread) in lanes {w['splitter_trace_1e5_ms']:.1f} ms, one by one {w['splitter_trace_each_1e5_ms']:.1f} ms: {bb / w['splitter_trace_1e5_ms']:.1f}x and {bb / w['splitter_trace_each_1e5_ms']:.1f}x numpy")
if bw:
    for key in ("splitter_trace_checksum", "splitter_trace_each_checksum"):
        assert bw[key] == w[key], f"wasm in Chromium and under Node disagree on {key}"
    bt, be = bw["splitter_trace_1e5_ms"], bw["splitter_trace_each_1e5_ms"]
    print(f"  two-wedge splitter, 10^5 whole traces, wasm in headless Chromium {bw['chromium']} (the design worker's build in the page, one thread): in lanes {bt:.1f} ms (least {bw['splitter_trace_least_1e5_ms']:.1f}; {1e5 / bt * 1e3:.0f}/s), one by one {be:.1f} ms: {bb / bt:.1f}x and {bb / be:.1f}x numpy (target 20x)")
g = n["splitter_general_trace_1e5_ms"]
print(f"  two-wedge splitter, whole traces by the planned trace ({n['splitter_trace_declined']} of 10^5 samples declined to the general tracer); by the general tracer alone {g:.1f} ms on one thread, native {sb['splitter_trace_1e5_ms'] / g:.1f}x numpy that way")
print(f"  Monte Carlo, angular splitter, 10^5 samples, native: {n['splitter_monte_carlo_1e5_ms']:.1f} ms (target 150 ms)")
sn, sp = n["spectrum_2000_ms"], spb["spectrum_2000_ms"]
print(f"  spectrum of a five-stage filter, 2 000 points, every point a whole trace: native on the machine's threads {sn:.1f} ms (target 20 ms), numpy (the Jones product alone) {sp:.2f} ms: native takes {sn / sp:.0f}x numpy's time")
ln, lp = n["lc_curve_200_ms"], lcb["lc_curve_200_ms"]
print(f"  liquid-crystal cell, retardance at 200 voltages (100 sublayers, warm-started director solves): native {ln:.1f} ms, numpy {lp:.1f} ms: native is {lp / ln:.0f}x as fast")
c_n, c_w, c_b = cn["conoscope_256_ms"], cw["conoscope_256_worker_build_ms"], cb["conoscope_256_ms"]
print(f"  conoscopic figure 256 x 256: native {c_n:.1f} ms, WebAssembly under Node (the page worker's build) {c_w:.1f} ms, numpy {c_b:.1f} ms: native {c_b / c_n:.1f}x, wasm {c_b / c_w:.1f}x numpy (target 100 ms in the page's worker)")
if p:
    print(f"  page, recompute + redraw of every view: median {p['update_redraw_ms']['median']} ms")
    print(f"  page, first complete render: {p['first_render_ms']} ms (budget 1500 ms, {'within' if p['first_render_within_budget'] else 'OVER'})")
    print(f"  page wasm: {p['wasm_bytes']} bytes (budget 500000, {'within' if p['wasm_within_budget'] else 'OVER'})")
    print(f"  Monte Carlo, displacer, 10^5 samples, in the page's worker: median {p['monte_carlo']['post_to_summary_ms']['median']} ms")
    print(f"  Monte Carlo, angular splitter, 10^5 samples, in the page's worker: median {p['splitter_monte_carlo']['post_to_done_ms']['median']} ms (target 300 ms)")
    cv = p["convergent"]["conoscope_post_to_drawn_ms"]
    print(f"  page, conoscopic figure 256 x 256 in the page's worker, post to drawn: median {cv['median']} ms (target 100 ms)")
    for name, pr in p["prisms"].items():
        print(f"  page, prism preset {name}, recompute + redraw of every view: median {pr['update_redraw_ms']['median']} ms (target 4 ms)")
PY
exit "$status"

//! The page's WebAssembly bindings: a thin layer that converts at the boundary and draws.
//!
//! Exported to JavaScript (and only this): a [`Session`] that holds the last good scenario and
//! its trace, takes a new scenario as JSON text or a plain JS object (read through
//! serde-wasm-bindgen), returns the result as a JS object, and draws any view on a canvas. A bad scenario returns
//! `{field, message}` and leaves the last good state in place, so the page keeps its picture.
//! The convergent-light views are computed by the page's worker ([`convergent_map`], in the
//! worker's build) and handed to the session ([`Session::set_convergent`]), which draws them.
//! A panic hook writes any bug's message into the page (element `#panic`) instead of leaving a
//! dead canvas.

use crate::contract::conoscope::{ConoscopeMap, MAX_PIXELS};
#[cfg(feature = "design-worker")]
use crate::contract::fields::Fields;
#[cfg(feature = "design-worker")]
use crate::contract::request::{DisplacerRequest, WavelengthBasis};
use crate::contract::result::{TraceResult, trace_scenario as trace};
use crate::contract::scenario::Scenario;
use crate::design::statistics as statistics_summary;
use crate::error::{Error, in_range};
use crate::optics::conoscope::Quantity;
use crate::view::conoscope::{CONE_DEG, map_view};
use crate::view::palette::Palette;
use crate::view::scene::Scene;
use crate::view::svg;
mod canvas;
mod scenes;
#[cfg(feature = "design-worker")]
use crate::design::{self, displacer as design_displacer, statistics};
use crate::optics::material;
use crate::view::{self as views, plot as view_plot};
use serde::Serialize;
use std::rc::Rc;
use wasm_bindgen::prelude::*;
use web_sys::HtmlCanvasElement;

const DEMO: &str = include_str!("../../examples/demo.json");

/// Results cross the boundary as JSON text parsed by the browser: one serializer (serde_json,
/// shortest round-trip numbers, so every double arrives exact) instead of a second one
/// monomorphized for every result type, which keeps the wasm within its size budget.
fn to_js<T: Serialize>(value: &T) -> Result<JsValue, JsValue> {
    let text =
        serde_json::to_string(value).map_err(|e| JsValue::from_str(&format!("cannot convert the result: {e}")))?;
    js_sys::JSON::parse(&text)
}

/// The one place where a core error becomes a JavaScript value: `{field, message}`.
fn js_error(e: Error) -> JsValue {
    to_js(&e.to_json()).unwrap_or_else(|_| JsValue::from_str(&e.to_string()))
}

/// Shows a panic's message in the page and on the console.
#[wasm_bindgen(start)]
pub fn start() {
    std::panic::set_hook(Box::new(|info| {
        let msg = format!(
            "Doublespar hit an internal error and stopped: {info}. Reload the page; please report the scenario link."
        );
        web_sys::console::error_1(&JsValue::from_str(&msg));
        if let Some(el) = web_sys::window()
            .and_then(|w| w.document())
            .and_then(|d| d.get_element_by_id("panic"))
        {
            el.set_text_content(Some(&msg));
            let _ = el.remove_attribute("hidden");
        }
    }));
}

/// The demo scenario, as JSON text.
#[wasm_bindgen(js_name = demoScenario)]
pub fn demo_scenario() -> String {
    DEMO.to_string()
}

/// The crystal catalogue as [`material::describe`] lists it:
/// `[{key, name, sign, range_nm, citation, verified, warnings}]`; `verified` is
/// false for a formula with no journal source, which the page marks "unverified data" wherever
/// it names the material.
///
/// # Errors
/// Never in practice (conversion of plain data).
#[wasm_bindgen]
pub fn materials() -> Result<JsValue, JsValue> {
    let mut list: Vec<serde_json::Value> = material::catalogue().iter().map(material::describe).collect();
    list.extend(material::biaxial_catalogue().iter().map(material::describe_biaxial));
    to_js(&list)
}

/// The names of the views that [`Session::draw`] accepts.
///
/// # Errors
/// Never in practice.
#[wasm_bindgen(js_name = viewNames)]
pub fn view_names() -> Result<JsValue, JsValue> {
    to_js(&views::VIEW_NAMES)
}

/// The design requests' constants the page shows or reads back, as the core holds them:
/// `{chunk_samples, default_samples, max_samples, default_acceptance_error_waves,
/// recombiner_min_overlap, recombiner_max_phase_rad, splitter_default_samples,
/// splitter_max_samples, rotator_rotation_tolerance_deg, rotator_ellipticity_tolerance_deg}`
/// (Monte Carlo chunk size, the displacer's default and largest sample counts, the waveplate's
/// default acceptance error, the overlap and phase limits at which a recombiner breaks, the
/// angular splitter's default and largest sample counts, and the quartz rotator's default
/// tolerances).
///
/// # Errors
/// Never in practice.
#[wasm_bindgen(js_name = designLimits)]
pub fn design_limits() -> Result<JsValue, JsValue> {
    use crate::contract::request;
    use crate::design::{displacer as dd, recombiner as dr};
    to_js(&serde_json::json!({
        "chunk_samples": dd::MC_CHUNK,
        "default_samples": request::displacer::DEFAULT_SAMPLES,
        "max_samples": request::displacer::MAX_SAMPLES,
        "default_acceptance_error_waves": request::waveplate::DEFAULT_ACCEPTANCE_ERROR_WAVES,
        "recombiner_min_overlap": dr::MIN_OVERLAP,
        "recombiner_max_phase_rad": dr::MAX_PHASE_ERROR,
        "splitter_default_samples": request::splitter::DEFAULT_SPLITTER_SAMPLES,
        "splitter_max_samples": request::splitter::MAX_SPLITTER_SAMPLES,
        "rotator_rotation_tolerance_deg": request::rotator::DEFAULT_ROTATION_TOLERANCE_DEG,
        "rotator_ellipticity_tolerance_deg": request::rotator::DEFAULT_ELLIPTICITY_TOLERANCE_DEG,
    }))
}

/// Solves a design request (JSON text, see `doublespar design`); returns the design object.
///
/// # Errors
/// `{field, message}` for a bad request.
#[cfg(feature = "design-worker")]
#[wasm_bindgen(js_name = designJson)]
pub fn design_json(text: &str) -> Result<JsValue, JsValue> {
    to_js(&design::solve_str(text).map_err(js_error)?)
}

/// One design run, held by the design worker: the request read and checked once, its nominal
/// design solved once, then Monte Carlo chunk by chunk (each of [`design_displacer::MC_CHUNK`]
/// samples, so that the worker reports progress between chunks) and the summary. Chunks
/// 0, 1, … summarized give exactly the `monte_carlo` of [`design_json`] (and of
/// `doublespar design`) for the same request.
#[cfg(feature = "design-worker")]
#[wasm_bindgen]
pub struct DesignRun {
    nominal: serde_json::Value,
    /// The displacer request, its cut tilt (degrees) and length (mm), when it has samples to draw.
    monte_carlo: Option<(DisplacerRequest, f64, f64)>,
    /// The samples of each chunk drawn so far, by chunk index.
    parts: Vec<Option<Vec<f64>>>,
}

#[cfg(feature = "design-worker")]
impl DesignRun {
    /// Reads and checks a request and solves its nominal design; a displacer with samples is
    /// solved without them (every field but `samples` checked there, then the whole request).
    fn new_checked(text: &str) -> Result<DesignRun, Error> {
        let none = |nominal| DesignRun {
            nominal,
            monte_carlo: None,
            parts: Vec::new(),
        };
        if text.len() > crate::contract::scenario::MAX_DOCUMENT_BYTES {
            return Err(Error::new("", "the request is larger than 1 MiB"));
        }
        let value: serde_json::Value = crate::contract::fields::parse_text(text)?;
        let is_displacer = value.get("kind").and_then(serde_json::Value::as_str) == Some("displacer");
        let has_samples = value.get("samples").is_none_or(|s| s.as_f64() != Some(0.0));
        if !(is_displacer && has_samples) {
            return Ok(none(design::solve(&value)?));
        }
        let mut without = value.clone();
        if let Some(m) = without.as_object_mut() {
            m.insert("samples".into(), serde_json::Value::from(0));
        }
        let nominal = design::solve(&without)?;
        // The Monte Carlo run reads the request as the solver does: in vacuum wavelengths.
        let vacuum = WavelengthBasis::read("displacer", &value)?.request;
        let mut f = Fields::new("", &vacuum)?;
        f.string("kind")?;
        let mut req = DisplacerRequest::from_json(&mut f)?;
        f.finish()?;
        if req.samples == 0 {
            return Ok(none(nominal));
        }
        let samples = req.samples;
        req.samples = 0;
        let d = design_displacer::design(&req)?;
        req.samples = samples;
        let parts = vec![None; samples.div_ceil(design_displacer::MC_CHUNK)];
        Ok(DesignRun {
            nominal,
            monte_carlo: Some((req, d.cut_tilt_deg, d.length_mm)),
            parts,
        })
    }
}

#[cfg(feature = "design-worker")]
#[wasm_bindgen]
impl DesignRun {
    /// Reads a design request (JSON text, see `doublespar design`) and solves its nominal design.
    ///
    /// # Errors
    /// `{field, message}` for a bad request.
    #[wasm_bindgen(constructor)]
    pub fn new(text: &str) -> Result<DesignRun, JsValue> {
        DesignRun::new_checked(text).map_err(js_error)
    }

    /// The design without its Monte Carlo summary (for a request without samples: the whole
    /// design).
    ///
    /// # Errors
    /// Never in practice.
    pub fn nominal(&self) -> Result<JsValue, JsValue> {
        to_js(&self.nominal)
    }

    /// Samples the run draws (0: no Monte Carlo run).
    #[wasm_bindgen(getter)]
    pub fn samples(&self) -> usize {
        self.monte_carlo.as_ref().map_or(0, |(r, _, _)| r.samples)
    }

    /// Chunks the run draws.
    #[wasm_bindgen(getter)]
    pub fn chunks(&self) -> usize {
        self.parts.len()
    }

    /// Draws chunk `k` (once; again is a no-op) and returns how many samples the run has drawn
    /// so far, for progress.
    pub fn chunk(&mut self, k: usize) -> usize {
        if let (Some((req, tilt, length)), Some(slot)) = (&self.monte_carlo, self.parts.get_mut(k))
            && slot.is_none()
        {
            *slot = Some(design_displacer::monte_carlo_chunk(req, *tilt, *length, k));
        }
        let drawn = self.parts.iter().filter(|p| p.is_some()).count();
        (drawn * design_displacer::MC_CHUNK).min(self.samples())
    }

    /// The Monte Carlo summary (mean, std, p5, p95, histogram) of every chunk, in chunk order
    /// (samples the model cannot evaluate are left out), as the design's `monte_carlo`.
    ///
    /// # Errors
    /// `{field: "", message}` when the run has no samples or a chunk was not drawn.
    pub fn summary(&self) -> Result<JsValue, JsValue> {
        let Some((req, _, _)) = &self.monte_carlo else {
            return Err(js_error(Error::new("", "this design run has no Monte Carlo samples")));
        };
        let mut all = Vec::with_capacity(req.samples);
        for (k, part) in self.parts.iter().enumerate() {
            let part = part
                .as_ref()
                .ok_or_else(|| js_error(Error::new("", format!("Monte Carlo chunk {k} was not drawn"))))?;
            all.extend_from_slice(part);
        }
        to_js(&statistics::summarize(&all, req.bins))
    }
}

/// Benchmark hook: the dense 10ⁿ-point walk-off sweep of [`crate::optics::sweep::walkoff_sweep_into`]
/// for calcite-like indices over 0–90°, returning Σ ρ as a checksum (scripts/bench.sh runs it
/// under Node beside the native build).
#[cfg(feature = "design-worker")]
#[wasm_bindgen(js_name = benchWalkoffSweep)]
pub fn bench_walkoff_sweep(n: usize) -> f64 {
    let Ok(ix) = crate::optics::material::Indices::new(1.6556901060179166, 1.484909030214121) else {
        return f64::NAN;
    };
    let mut out = vec![0.0; n];
    crate::optics::sweep::walkoff_sweep_into(ix, 0.0, std::f64::consts::FRAC_PI_2, &mut out);
    crate::optics::sweep::checksum(&out)
}

/// Benchmark hook: the two-wedge workload of [`crate::optics::workload`] on the scenario `doc`
/// (JSON text; scripts/bench/two-wedge-splitter.json), `n` samples of `work`: `"trace"` (whole
/// traces by the planned trace in blocks of incidences side by side), `"each"` (the same one
/// incidence at a time), `"general"` (the same by the general tracer) or `"split"` (split
/// angles), returning its checksum (scripts/bench.sh runs it under Node beside the native build
/// and the numpy baseline); or, for `"alone"` and `"declined"`, how many of the whole traces the
/// lanes gave back to be traced one by one and how many the plan declined
/// ([`crate::optics::workload::samples_traced_alone`], [`crate::optics::workload::declined_samples`];
/// tests/worker_lanes.mjs checks that both are 0 there, as natively).
///
/// # Errors
/// `{field, message}`: the scenario's first error, naming its field; `work` when it is none of
/// the six.
#[cfg(feature = "design-worker")]
#[wasm_bindgen(js_name = benchSplitter)]
pub fn bench_splitter(doc: &str, n: usize, work: &str) -> Result<f64, JsValue> {
    use crate::optics::workload::{Workload, run};
    let resolved = || Scenario::from_json_str(doc).and_then(|s| s.resolve()).map_err(js_error);
    match work {
        "alone" => return Ok(crate::optics::workload::samples_traced_alone(&resolved()?.0, n) as f64),
        "declined" => return Ok(crate::optics::workload::declined_samples(&resolved()?.0, n) as f64),
        _ => {}
    }
    let work = match work {
        "trace" => Workload::LaneTrace,
        "each" => Workload::Trace,
        "general" => Workload::GeneralTrace,
        "split" => Workload::Split,
        _ => {
            return Err(js_error(Error::new(
                "work",
                "one of trace, each, general, split, alone, declined",
            )));
        }
    };
    Ok(run(&resolved()?.0, n, work))
}

/// The quantity of a convergent-light view, and its slot in a [`Session`].
fn convergent_view(view: &str) -> Option<(Quantity, usize)> {
    match view {
        "conoscope" => Some((Quantity::Transmission, 0)),
        "acceptance" => Some((Quantity::RetardanceError, 1)),
        _ => None,
    }
}

/// The map of the convergent-light view `view` (`conoscope` or `acceptance`) for the scenario
/// `doc` (JSON text) over the views' 30° cone at `pixels` per side (fewer for a set-up with a
/// liquid-crystal cell: the core's cap, so the map's side is the square root of its length), for
/// the page's worker: a Float64Array row-major from the top row, NaN outside the cone (the page
/// hands it, with its smallest and largest value, to [`Session::set_convergent`]).
///
/// # Errors
/// `{field, message}`: `view` for another view, `conoscope.pixels` outside 1 to 512, the
/// scenario's first error, or the element convergent light is not solved for.
#[cfg(feature = "design-worker")]
#[wasm_bindgen(js_name = convergentMap)]
pub fn convergent_map(doc: &str, view: &str, pixels: usize) -> Result<Vec<f64>, JsValue> {
    use crate::contract::conoscope::conoscope_of;
    let (quantity, _) = Session::convergent_slot(view)?;
    let map = Scenario::from_json_str(doc)
        .and_then(|s| conoscope_of(&s, quantity, CONE_DEG, pixels))
        .map_err(js_error)?;
    Ok(map.values.iter().map(|v| v.unwrap_or(f64::NAN)).collect())
}

/// Part `part` (from 0) of `parts` of the conoscopic figure in white light of the scenario `doc`
/// (JSON text) over the views' 30° cone at `pixels` per side (fewer for a set-up with a
/// liquid-crystal cell: the core's cap), for the page's workers, which share the figure's rows:
/// RGBA bytes of the whole figure, row-major from the top row, with only the part's rows drawn
/// (`contract::conoscope::part_rows`; every other pixel transparent) and transparent outside the
/// cone; its side is the square root of a quarter of its length. What it shows and its sampling
/// are [`convergent_white_note`]'s.
///
/// # Errors
/// `{field, message}`: `conoscope.pixels` outside 1 to 256, `conoscope.parts` outside 1 to 16,
/// `conoscope.part` not below it, the scenario's first error at any wavelength of the colour
/// tables, or the element convergent light is not solved for.
#[cfg(feature = "design-worker")]
#[wasm_bindgen(js_name = convergentWhite)]
pub fn convergent_white(doc: &str, pixels: usize, part: usize, parts: usize) -> Result<Vec<u8>, JsValue> {
    use crate::contract::conoscope::white_light_part;
    let map = Scenario::from_json_str(doc)
        .and_then(|s| white_light_part(&s, CONE_DEG, pixels, part, parts))
        .map_err(js_error)?;
    Ok(map.rgba())
}

/// The note under a white-light conoscopic figure of `pixels` per side: the illuminant, observer
/// and wavelengths sampled.
#[cfg(feature = "design-worker")]
#[wasm_bindgen(js_name = convergentWhiteNote)]
pub fn convergent_white_note(pixels: usize) -> String {
    crate::contract::conoscope::white_light_note(pixels)
}

/// Draws a plot of a data series given as JSON text (`{title, x_label, x_unit, y_label, y_unit,
/// points: [[x, y], …], current: [x, y] | null, markers: [[x, y], …] (optional), note}`), for
/// curves computed elsewhere (the design worker).
///
/// # Errors
/// `{field: "series", message}` when the text is not such a series.
#[wasm_bindgen(js_name = drawSeries)]
pub fn draw_series(canvas: &HtmlCanvasElement, series_json: &str, dark: bool) -> Result<(), JsValue> {
    let value: serde_json::Value =
        serde_json::from_str(series_json).map_err(|e| js_error(Error::new("series", format!("not JSON: {e}"))))?;
    let series = crate::view::series::Series::from_json(&value).map_err(js_error)?;
    let palette = Palette::for_scheme(dark);
    canvas::draw(&view_plot::plot(&series), canvas, &palette)
}

/// Draws the histogram of a Monte Carlo summary given as JSON text (the `monte_carlo` object of
/// a displacer design), with the nominal value marked when given.
///
/// # Errors
/// `{field: "summary", message}` when the text is not such a summary.
#[wasm_bindgen(js_name = drawHistogram)]
pub fn draw_histogram(
    canvas: &HtmlCanvasElement,
    summary_json: &str,
    title: &str,
    quantity: &str,
    unit: &str,
    nominal: Option<f64>,
    dark: bool,
) -> Result<(), JsValue> {
    let value: serde_json::Value =
        serde_json::from_str(summary_json).map_err(|e| js_error(Error::new("summary", format!("not JSON: {e}"))))?;
    let summary = statistics_summary::Summary::from_json(&value).map_err(js_error)?;
    let palette = Palette::for_scheme(dark);
    canvas::draw(
        &view_plot::histogram(title, quantity, unit, &summary, nominal),
        canvas,
        &palette,
    )
}

/// A scenario and its trace, kept between edits, with the maps of its convergent-light views
/// (`conoscope`, `acceptance`) once the page's worker has computed them.
#[wasm_bindgen]
pub struct Session {
    scenario: Scenario,
    result: TraceResult,
    convergent: [Option<Result<ConoscopeMap, Error>>; 2],
    scenes: scenes::Scenes,
}

/// The result as an edit hands it to the page: everything but each ray's `points_mm` polyline,
/// which only the side view reads, and it is drawn here. For 4096 rays that halves the text to
/// write and parse; `session.result()` still gives every field.
fn to_js_without_polylines(result: &mut TraceResult) -> Result<JsValue, JsValue> {
    let mut polylines: Vec<Vec<[f64; 3]>> = Vec::with_capacity(result.rays.len());
    for ray in &mut result.rays {
        polylines.push(std::mem::take(&mut ray.points_mm));
    }
    let out = to_js(result);
    for (ray, points) in result.rays.iter_mut().zip(polylines) {
        ray.points_mm = points;
    }
    out
}

impl Session {
    fn accept(&mut self, parsed: Result<Scenario, Error>) -> Result<JsValue, JsValue> {
        let scenario = parsed.map_err(js_error)?;
        let mut result = trace(&scenario).map_err(js_error)?;
        let out = to_js_without_polylines(&mut result)?;
        self.scenes.follow(&scenario);
        self.scenario = scenario;
        self.result = result;
        self.convergent = [None, None];
        Ok(out)
    }

    /// The scene of a view: a convergent-light view from the map given to it (or a note that
    /// it is being computed), any other as [`views::build`] makes it, once per scenario
    /// ([`scenes::Scenes`]). Not inlined: its three callers share it (the module's size).
    #[inline(never)]
    fn view_scene(&self, view: &str) -> Result<Rc<Scene>, Error> {
        match convergent_view(view) {
            Some((quantity, slot)) => Ok(Rc::new(map_view(
                &self.scenario,
                quantity,
                self.convergent[slot].as_ref(),
            ))),
            None => match self.scenes.find(view) {
                Some(scene) => Ok(scene),
                None => Ok(self
                    .scenes
                    .keep(view, views::build_with_partner(view, &self.scenario, &self.result)?)),
            },
        }
    }

    /// The slot of a convergent-light view.
    fn convergent_slot(view: &str) -> Result<(Quantity, usize), JsValue> {
        convergent_view(view).ok_or_else(|| js_error(Error::new("view", "expected conoscope or acceptance")))
    }
}

#[wasm_bindgen]
impl Session {
    /// A session showing the demo scenario.
    ///
    /// # Errors
    /// Only if the built-in demo were invalid (tested natively).
    #[wasm_bindgen(constructor)]
    pub fn new() -> Result<Session, JsValue> {
        let scenario = Scenario::from_json_str(DEMO).map_err(js_error)?;
        let result = trace(&scenario).map_err(js_error)?;
        Ok(Session {
            scenes: scenes::Scenes::default(),
            scenario,
            result,
            convergent: [None, None],
        })
    }

    /// Traces a scenario given as JSON text and keeps it. Returns the result object.
    ///
    /// # Errors
    /// `{field, message}` for a bad scenario; the previous scenario and result are kept.
    #[wasm_bindgen(js_name = updateJson)]
    pub fn update_json(&mut self, text: &str) -> Result<JsValue, JsValue> {
        self.accept(Scenario::from_json_str(text))
    }

    /// The current result object.
    ///
    /// # Errors
    /// Never in practice.
    pub fn result(&self) -> Result<JsValue, JsValue> {
        to_js(&self.result)
    }

    /// The current scenario with every default written out, as JSON text.
    #[wasm_bindgen(js_name = scenarioJson)]
    pub fn scenario_json(&self) -> String {
        self.scenario.to_json().to_string()
    }

    /// The display list of a view, for tests and tools.
    ///
    /// # Errors
    /// `{field: "view", message}` for an unknown view.
    pub fn scene(&self, view: &str) -> Result<JsValue, JsValue> {
        to_js(&*self.view_scene(view).map_err(js_error)?)
    }

    /// Draws a view on a canvas, in the dark or light palette.
    ///
    /// # Errors
    /// `{field: "view", message}` for an unknown view; a JavaScript error if the canvas fails.
    pub fn draw(&self, view: &str, canvas: &HtmlCanvasElement, dark: bool) -> Result<(), JsValue> {
        let scene = self.view_scene(view).map_err(js_error)?;
        let palette = Palette::for_scheme(dark);
        canvas::draw(&scene, canvas, &palette)
    }

    /// Gives the convergent-light view `view` (`conoscope` or `acceptance`) what the page's worker
    /// found for the session's scenario: its map as the design worker's `convergentMap` returns it (`pixels` per
    /// side, `values` row-major from the top row with NaN outside the cone, their `min` and
    /// `max`), or, when `message` is not empty, the error `{field, message}` it met. Drawing the
    /// view then shows it, until the next scenario is traced.
    ///
    /// # Errors
    /// `{field, message}`: `view` for another view; `conoscope.pixels` when `values` is not
    /// `pixels` × `pixels` long or `pixels` is outside 1 to 512.
    #[wasm_bindgen(js_name = setConvergent)]
    #[expect(clippy::too_many_arguments)]
    pub fn set_convergent(
        &mut self,
        view: &str,
        pixels: usize,
        values: &[f64],
        min: f64,
        max: f64,
        field: &str,
        message: &str,
    ) -> Result<(), JsValue> {
        let (quantity, slot) = Session::convergent_slot(view)?;
        if !message.is_empty() {
            self.convergent[slot] = Some(Err(Error::new(field, message)));
            return Ok(());
        }
        if !(1..=MAX_PIXELS).contains(&pixels) || pixels.checked_mul(pixels) != Some(values.len()) {
            return Err(js_error(Error::new(
                "conoscope.pixels",
                format!("expected 1 to {MAX_PIXELS} pixels per side and that many squared values"),
            )));
        }
        self.convergent[slot] = Some(Ok(ConoscopeMap {
            quantity,
            cone_deg: CONE_DEG,
            pixels,
            values: values.iter().map(|v| v.is_finite().then_some(*v)).collect(),
            min,
            max,
        }));
        Ok(())
    }

    /// The data of a plot view as `{title, x_label, x_unit, y_label, y_unit, points, current,
    /// note}`, or `null` for a view that is not a plot (for CSV and JSON export).
    ///
    /// # Errors
    /// `{field, message}` if the formula breaks down.
    pub fn series(&self, view: &str) -> Result<JsValue, JsValue> {
        match views::series(view, &self.scenario).map_err(js_error)? {
            Some(s) => to_js(&s),
            None => Ok(JsValue::NULL),
        }
    }

    /// A view as an SVG document of the given size in pixels (50 to 10 000 each).
    ///
    /// # Errors
    /// `{field: "view", message}` for an unknown view; `width` or `height` out of range.
    pub fn svg(&self, view: &str, width: f64, height: f64, dark: bool) -> Result<String, JsValue> {
        let width = in_range("width", width, 50.0, 10_000.0).map_err(js_error)?;
        let height = in_range("height", height, 50.0, 10_000.0).map_err(js_error)?;
        let scene = self.view_scene(view).map_err(js_error)?;
        let palette = Palette::for_scheme(dark);
        Ok(svg::to_svg(&scene, width, height, &palette))
    }
}

/// The starting points the page offers, `[{key, name, scenario}]`: every document of
/// `examples/` (the demo first), with the name the page's chooser shows and the file's text as
/// `scenario`, so that the page and the command line read the same files.
///
/// # Errors
/// Never in practice (conversion of plain data).
#[wasm_bindgen]
pub fn presets() -> Result<JsValue, JsValue> {
    let files = [
        ("demo", "demo: calcite displacer", DEMO),
        (
            "recombiner",
            "YVO₄ pair, half-wave plate",
            include_str!("../../examples/recombiner.json"),
        ),
        (
            "quarter-wave",
            "quartz quarter-wave, oblique",
            include_str!("../../examples/quarter-wave.json"),
        ),
        (
            "crossed-calcite-splitter",
            "calcite wedge splitter",
            include_str!("../../examples/crossed-calcite-splitter.json"),
        ),
        (
            "straight-through-prism",
            "straight-through prism",
            include_str!("../../examples/straight-through-prism.json"),
        ),
        (
            "air-gap-calcite-polarizer",
            "calcite polarizer, air gap",
            include_str!("../../examples/air-gap-calcite-polarizer.json"),
        ),
        (
            "quartz-wedge-splitter",
            "quartz wedge splitter",
            include_str!("../../examples/quartz-wedge-splitter.json"),
        ),
        (
            "tilt-tuned-quartz-plate",
            "tilt-tuned quartz plate",
            include_str!("../../examples/tilt-tuned-quartz-plate.json"),
        ),
        (
            "ktp-plate",
            "KTP plate, biaxial walk-off",
            include_str!("../../examples/ktp-plate.json"),
        ),
        (
            "quartz-rotator",
            "quartz rotator, 45°",
            include_str!("../../examples/quartz-rotator.json"),
        ),
        (
            "twisted-nematic-cell",
            "twisted nematic cell, crossed",
            include_str!("../../examples/twisted-nematic-cell.json"),
        ),
    ];
    let list: Vec<serde_json::Value> = files
        .iter()
        .map(|(key, name, text)| serde_json::json!({"key": key, "name": name, "scenario": text}))
        .collect();
    to_js(&list)
}

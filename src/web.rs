//! The page's WebAssembly bindings: a thin layer that converts at the boundary and draws.
//!
//! Exported to JavaScript (and only this): a [`Session`] that holds the last good scenario and
//! its trace, takes a new scenario as JSON text or a plain JS object (read through
//! serde-wasm-bindgen), returns the result as a JS object, and draws any view on a canvas. A bad scenario returns
//! `{field, message}` and leaves the last good state in place, so the page keeps its picture.
//! A panic hook writes any bug's message into the page (element `#panic`) instead of leaving a
//! dead canvas.

use crate::error::{Error, in_range};
#[cfg(feature = "design-worker")]
use crate::json_fields::Fields;
use crate::scenario::Scenario;
use crate::statistics as statistics_summary;
use crate::svg::{self, Palette};
use crate::trace::{TraceResult, trace};
use crate::{canvas, material, sweep, view_plot, views};
#[cfg(feature = "design-worker")]
use crate::{design, design_displacer, statistics};
use serde::Serialize;
use wasm_bindgen::prelude::*;
use web_sys::HtmlCanvasElement;

const DEMO: &str = include_str!("../examples/demo.json");

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
    let list: Vec<serde_json::Value> = material::catalogue().iter().map(material::describe).collect();
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

/// Solves a design request (JSON text, see `doublespar design`); returns the design object.
///
/// # Errors
/// `{field, message}` for a bad request.
#[cfg(feature = "design-worker")]
#[wasm_bindgen(js_name = designJson)]
pub fn design_json(text: &str) -> Result<JsValue, JsValue> {
    to_js(&design::solve_str(text).map_err(js_error)?)
}

/// Monte Carlo chunk `chunk` (of [`design_displacer::MC_CHUNK`] samples) of a displacer
/// request: the sampled separations in mm. Running chunks 0, 1, … and summarizing them gives
/// exactly the `monte_carlo` of [`design_json`], so a worker can report progress between chunks.
///
/// # Errors
/// `{field, message}` for a bad request.
#[cfg(feature = "design-worker")]
#[wasm_bindgen(js_name = displacerChunk)]
pub fn displacer_chunk(text: &str, chunk: usize) -> Result<Vec<f64>, JsValue> {
    let value: serde_json::Value =
        serde_json::from_str(text).map_err(|e| js_error(Error::new("", format!("not valid JSON: {e}"))))?;
    let mut f = Fields::new("", &value).map_err(js_error)?;
    match f.string("kind").map_err(js_error)? {
        None | Some("displacer") => {}
        Some(other) => {
            return Err(js_error(Error::new(
                "kind",
                format!("Monte Carlo chunks are for displacers, not '{other}'"),
            )));
        }
    }
    let mut req = design_displacer::DisplacerRequest::from_json(&mut f).map_err(js_error)?;
    f.finish().map_err(js_error)?;
    let samples = req.samples;
    req.samples = 0;
    let nominal = design_displacer::design(&req).map_err(js_error)?;
    req.samples = samples;
    Ok(design_displacer::monte_carlo_chunk(
        &req,
        nominal.cut_tilt_deg,
        nominal.length_mm,
        chunk,
    ))
}

/// Benchmark hook: the dense 10ⁿ-point walk-off sweep of [`crate::sweep::walkoff_sweep_into`]
/// for calcite-like indices over 0–90°, returning Σ ρ as a checksum (scripts/bench.sh runs it
/// under Node beside the native build).
#[cfg(feature = "design-worker")]
#[wasm_bindgen(js_name = benchWalkoffSweep)]
pub fn bench_walkoff_sweep(n: usize) -> f64 {
    let Ok(ix) = crate::material::Indices::new(1.6556901060179166, 1.484909030214121) else {
        return f64::NAN;
    };
    let mut out = vec![0.0; n];
    crate::sweep::walkoff_sweep_into(ix, 0.0, std::f64::consts::FRAC_PI_2, &mut out);
    crate::sweep::checksum(&out)
}

/// Summary statistics (mean, std, p5, p95, histogram) of samples, as the design reports them.
///
/// # Errors
/// Never in practice.
#[cfg(feature = "design-worker")]
#[wasm_bindgen]
pub fn summarize(samples: &[f64], bins: usize) -> Result<JsValue, JsValue> {
    to_js(&statistics::summarize(samples, bins))
}

/// Draws a plot of a data series given as JSON text (`{title, x_label, x_unit, y_label, y_unit,
/// points: [[x, y], …], current: [x, y] | null, note}`), for curves computed elsewhere (the design
/// worker).
///
/// # Errors
/// `{field: "series", message}` when the text is not such a series.
#[wasm_bindgen(js_name = drawSeries)]
pub fn draw_series(canvas: &HtmlCanvasElement, series_json: &str, dark: bool) -> Result<(), JsValue> {
    let value: serde_json::Value =
        serde_json::from_str(series_json).map_err(|e| js_error(Error::new("series", format!("not JSON: {e}"))))?;
    let series = sweep::Series::from_json(&value).map_err(js_error)?;
    let palette = if dark { Palette::dark() } else { Palette::light() };
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
    let palette = if dark { Palette::dark() } else { Palette::light() };
    canvas::draw(
        &view_plot::histogram(title, quantity, unit, &summary, nominal),
        canvas,
        &palette,
    )
}

/// A scenario and its trace, kept between edits.
#[wasm_bindgen]
pub struct Session {
    scenario: Scenario,
    result: TraceResult,
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
        self.scenario = scenario;
        self.result = result;
        Ok(out)
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
        Ok(Session { scenario, result })
    }

    /// Traces a scenario given as JSON text and keeps it. Returns the result object.
    ///
    /// # Errors
    /// `{field, message}` for a bad scenario; the previous scenario and result are kept.
    #[wasm_bindgen(js_name = updateJson)]
    pub fn update_json(&mut self, text: &str) -> Result<JsValue, JsValue> {
        self.accept(Scenario::from_json_str(text))
    }

    /// Traces a scenario given as a plain JavaScript object and keeps it. The object goes through
    /// `JSON.stringify` and the strict reader of [`Session::update_json`], so that both forms
    /// read one text the same way (and the module carries one reader).
    ///
    /// # Errors
    /// As [`Session::update_json`].
    pub fn update(&mut self, scenario: JsValue) -> Result<JsValue, JsValue> {
        let text = js_sys::JSON::stringify(&scenario)
            .ok()
            .and_then(|t| t.as_string())
            .ok_or_else(|| js_error(Error::new("", "not a scenario object: JSON.stringify refused it")))?;
        self.accept(Scenario::from_json_str(&text))
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
        to_js(&views::build(view, &self.scenario, &self.result).map_err(js_error)?)
    }

    /// Draws a view on a canvas, in the dark or light palette.
    ///
    /// # Errors
    /// `{field: "view", message}` for an unknown view; a JavaScript error if the canvas fails.
    pub fn draw(&self, view: &str, canvas: &HtmlCanvasElement, dark: bool) -> Result<(), JsValue> {
        let scene = views::build(view, &self.scenario, &self.result).map_err(js_error)?;
        let palette = if dark { Palette::dark() } else { Palette::light() };
        canvas::draw(&scene, canvas, &palette)
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
        let scene = views::build(view, &self.scenario, &self.result).map_err(js_error)?;
        let palette = if dark { Palette::dark() } else { Palette::light() };
        Ok(svg::to_svg(&scene, width, height, &palette))
    }
}

//! A plot of a [`Series`]: axes with ticks, units and labels, the curve, and the current point.
//!
//! World coordinates are the data's own units (x and y scaled independently, [`Aspect::Free`]).
//! Ticks fall on round values ([`nice_step_at_least`]) and their labels stay at their ticks (the
//! placement pass leaves out one that would touch its neighbour); the current operating point is
//! a marker with its value written beside it. An empty series gives a framed panel with its note.
//! Numbers come from [`crate::numfmt`]; an axis in mm is written in the one length unit its
//! largest value chooses (a separation of 2 µm reads "2.00 µm", not "0.002 mm"), its geometry
//! staying in the data's units.

use crate::design::statistics::Summary;
use crate::numfmt::{LengthUnit, sig, tick};
use crate::view::scene::{Anchor, Aspect, Item, Priority, Rect, Role, Scene, nice_step_at_least};
use crate::view::series::Series;

/// How an axis writes its numbers: the factor from data units to shown units, and the unit shown.
/// Lengths in mm take the unit their largest magnitude chooses; other units are shown as given.
fn axis_unit(unit: &str, largest: f64) -> (f64, String) {
    if unit == "mm" {
        let u = LengthUnit::for_max(largest);
        (u.per_mm(), u.symbol().to_string())
    } else {
        (1.0, unit.to_string())
    }
}

/// Builds the plot of a series.
pub fn plot(series: &Series) -> Scene {
    plot_with(series, None)
}

/// A second curve drawn dashed against an axis of its own on the right of the frame: `points`
/// in the series' x units and the curve's own y units, `range` [bottom, top] the span of that
/// axis (the frame's height), `name` the axis's name, `tag` the curve's.
pub struct RightCurve<'a> {
    /// The samples [x, y], x in the series' units, y in the right axis'.
    pub points: &'a [[f64; 2]],
    /// The values at the bottom and at the top of the frame.
    pub range: [f64; 2],
    /// The right axis' name, written above its top end.
    pub name: &'a str,
    /// The curve's tag.
    pub tag: &'a str,
}

impl RightCurve<'_> {
    /// Where the value `v` of the right axis stands in the left axis' units, for the data
    /// `frame` of [`frame`].
    ///
    /// Formula: y = y0 + (v − bottom)·(y1 − y0)/(top − bottom).
    pub fn y_in(&self, frame: &Rect, v: f64) -> f64 {
        let [lo, hi] = self.range;
        frame.y0 + (v - lo) * (frame.height() / (hi - lo))
    }
}

/// Builds the plot of a series with, when given, a `second` curve on its own right-hand axis
/// (dashed, split at gaps as the first; the left axis spans the series alone).
pub fn plot_with(series: &Series, second: Option<&RightCurve>) -> Scene {
    let mut scene = Scene::new(&series.title, &series.note, Aspect::Free);
    let Some(a) = PlotAxes::of(series) else {
        empty_panel(&mut scene, series.note.clone());
        return scene;
    };
    a.grid_and_ticks(&mut scene);
    a.frame_and_names(&mut scene, series);
    a.curve(&mut scene, &series.points, vec![], "curve");
    let mut right = 0.03;
    if let Some(c) = second.filter(|c| !c.points.is_empty()) {
        a.right_axis(&mut scene, c);
        right = 0.12;
    }
    a.marked_points(&mut scene, series);
    scene.bounds = Rect {
        x0: a.x0 - 0.1 * a.w,
        y0: a.y0 - 0.31 * a.h,
        x1: a.x1 + right * a.w,
        y1: a.y1 + 0.1 * a.h,
    };
    scene
}

/// The data frame [`plot_with`] draws for `series` (x over the data, y from 0 or below to the
/// top), in data units, so that a caller can place things relative to it; `None` for an empty
/// series.
pub fn frame(series: &Series) -> Option<Rect> {
    PlotAxes::of(series).map(|a| Rect {
        x0: a.x0,
        y0: a.y0,
        x1: a.x1,
        y1: a.y1,
    })
}

/// A framed unit panel that says `note` in its middle (a plot with nothing to draw).
fn empty_panel(scene: &mut Scene, note: String) {
    scene.bounds = Rect {
        x0: 0.0,
        y0: 0.0,
        x1: 1.0,
        y1: 1.0,
    };
    scene.text([0.5, 0.5], note, 12.0, Anchor::Middle, Role::Caption);
}

/// A plot's axes: the ranges drawn (data units), their widths, and the factor and unit each
/// axis writes its numbers in.
struct PlotAxes {
    x0: f64,
    x1: f64,
    y0: f64,
    y1: f64,
    w: f64,
    h: f64,
    fx: f64,
    x_unit: String,
    fy: f64,
    y_unit: String,
}

impl PlotAxes {
    /// Axes around every point of `series` (curve, current point, markers); `None` when there
    /// is none.
    fn of(series: &Series) -> Option<PlotAxes> {
        let mut pts: Vec<[f64; 2]> = series.points.clone();
        pts.extend(series.current.iter().chain(&series.markers));
        (!pts.is_empty()).then(|| PlotAxes::around(series, Rect::around(pts)))
    }

    /// Axes around the `data` of `series`: y always includes 0, and an empty range is widened.
    fn around(series: &Series, data: Rect) -> PlotAxes {
        let (mut y0, mut y1) = (data.y0.min(0.0), data.y1.max(0.0));
        if y1 - y0 < 1e-12 * y0.abs().max(y1.abs()).max(1e-300) || y1 == y0 {
            let c = 0.5 * (y0 + y1);
            let h = if c != 0.0 { 0.05 * c.abs() } else { 1.0 };
            y0 = c - h;
            y1 = c + h;
        }
        let (x0, x1) = if data.width() > 0.0 {
            (data.x0, data.x1)
        } else {
            (data.x0 - 1.0, data.x1 + 1.0)
        };
        let (w, h) = (x1 - x0, y1 - y0);
        let (fx, x_unit) = axis_unit(&series.x_unit, x0.abs().max(x1.abs()));
        let (fy, y_unit) = axis_unit(&series.y_unit, y0.abs().max(y1.abs()));
        PlotAxes {
            x0,
            x1,
            y0,
            y1,
            w,
            h,
            fx,
            x_unit,
            fy,
            y_unit,
        }
    }

    /// Draws the grid lines, ticks and tick labels: at most about five labels per axis, so that
    /// they stay apart in a narrow panel.
    fn grid_and_ticks(&self, scene: &mut Scene) {
        let (x0, x1, y0, y1, w, h) = (self.x0, self.x1, self.y0, self.y1, self.w, self.h);
        let xs = nice_step_at_least(w / 5.0);
        let ys = nice_step_at_least(h / 5.0);
        let mut t = (x0 / xs).ceil() * xs;
        while t <= x1 + 1e-9 * w {
            scene.line(vec![[t, y0], [t, y1]], Role::Grid, vec![1.0, 3.0], 0.5, "grid x");
            scene.fixed_label(
                [t, y0 - 0.1 * h],
                tick(t * self.fx, xs * self.fx),
                10.0,
                Anchor::Middle,
                Role::Caption,
            );
            t += xs;
        }
        let mut t = (y0 / ys).ceil() * ys;
        while t <= y1 + 1e-9 * h {
            scene.line(vec![[x0, t], [x1, t]], Role::Grid, vec![1.0, 3.0], 0.5, "grid y");
            scene.fixed_label(
                [x0 - 0.015 * w, t - 0.02 * h],
                tick(t * self.fy, ys * self.fy),
                10.0,
                Anchor::End,
                Role::Caption,
            );
            t += ys;
        }
    }

    /// Draws the frame and the axes' names with their units.
    fn frame_and_names(&self, scene: &mut Scene, series: &Series) {
        let (x0, x1, y0, y1, h) = (self.x0, self.x1, self.y0, self.y1, self.h);
        scene.items.push(Item::Polygon {
            points: vec![[x0, y0], [x1, y0], [x1, y1], [x0, y1]],
            role: Role::Frame,
            tag: "frame".into(),
        });
        scene.label(
            [0.5 * (x0 + x1), y0 - 0.25 * h],
            format!("{} ({})", series.x_label, self.x_unit),
            11.0,
            Anchor::Middle,
            Role::Label,
            Priority::Key,
        );
        scene.label(
            [x0, y1 + 0.04 * h],
            format!("{} ({})", series.y_label, self.y_unit),
            11.0,
            Anchor::Start,
            Role::Label,
            Priority::Key,
        );
    }

    /// Draws the curve `points` with `dash`, split where samples are missing (gaps wider than
    /// twice the usual spacing).
    fn curve(&self, scene: &mut Scene, points: &[[f64; 2]], dash: Vec<f64>, tag: &str) {
        let mut run: Vec<[f64; 2]> = Vec::new();
        let spacing = if points.len() > 1 {
            self.w / (points.len() - 1) as f64
        } else {
            self.w
        };
        for p in points {
            if let Some(last) = run.last()
                && p[0] - last[0] > 2.5 * spacing
            {
                scene.line(std::mem::take(&mut run), Role::Curve, dash.clone(), 1.8, tag);
            }
            run.push(*p);
        }
        if !run.is_empty() {
            scene.line(run, Role::Curve, dash, 1.8, tag);
        }
    }

    /// Draws the curve `c` dashed against its own axis on the right edge of the frame: a tick
    /// and its number at round values (about five), and the axis' name above its top end (short:
    /// it shares the line with the left axis' name, and a caption says what the dashes are).
    fn right_axis(&self, scene: &mut Scene, c: &RightCurve) {
        let f = Rect {
            x0: self.x0,
            y0: self.y0,
            x1: self.x1,
            y1: self.y1,
        };
        let [lo, hi] = c.range;
        let step = nice_step_at_least((hi - lo).abs() / 5.0);
        let mut t = (lo.min(hi) / step).ceil() * step;
        while t <= lo.max(hi) + 1e-9 * step {
            let y = c.y_in(&f, t);
            scene.line(
                vec![[self.x1, y], [self.x1 + 0.015 * self.w, y]],
                Role::Frame,
                vec![],
                1.0,
                "right tick",
            );
            scene.fixed_label(
                [self.x1 + 0.025 * self.w, y - 0.02 * self.h],
                tick(t, step),
                10.0,
                Anchor::Start,
                Role::Caption,
            );
            t += step;
        }
        scene.label(
            [self.x1, self.y1 + 0.04 * self.h],
            c.name.to_string(),
            11.0,
            Anchor::End,
            Role::Label,
            Priority::Normal,
        );
        let drawn: Vec<[f64; 2]> = c.points.iter().map(|p| [p[0], c.y_in(&f, p[1])]).collect();
        self.curve(scene, &drawn, vec![6.0, 4.0], c.tag);
    }

    /// Draws the current point and the series' markers, each with its value beside it.
    fn marked_points(&self, scene: &mut Scene, series: &Series) {
        let (w, h, fx, fy) = (self.w, self.h, self.fx, self.fy);
        let (x_unit, y_unit) = (&self.x_unit, &self.y_unit);
        let marked = series
            .current
            .iter()
            .map(|c| (c, "current"))
            .chain(series.markers.iter().map(|c| (c, "marker")));
        for (&c, tag) in marked {
            scene.items.push(Item::Dot {
                center: c,
                radius_px: 5.0,
                role: Role::Marker,
                filled: true,
                tag: tag.into(),
            });
            let right = c[0] < self.x0 + 0.7 * w;
            let label = format!("{} {y_unit} at {} {x_unit}", sig(c[1] * fy, 4), sig(c[0] * fx, 4));
            scene.text(
                [c[0] + if right { 0.02 } else { -0.02 } * w, c[1] + 0.04 * h],
                label,
                11.0,
                if right { Anchor::Start } else { Anchor::End },
                Role::Marker,
            );
        }
    }
}

/// Builds a histogram of a Monte Carlo `Summary`: one bar per bin, with the nominal value,
/// the mean and the 5th and 95th percentiles marked and written out.
pub fn histogram(title: &str, quantity: &str, unit: &str, summary: &Summary, nominal: Option<f64>) -> Scene {
    let mut scene = Scene::new(title, &format!("{} samples", summary.n), Aspect::Free);
    let h = &summary.histogram;
    let peak = h.counts.iter().copied().max().unwrap_or(0) as f64;
    if h.counts.is_empty() || h.edges.len() != h.counts.len() + 1 || peak <= 0.0 {
        empty_panel(&mut scene, "no samples".into());
        return scene;
    }
    let (x0, x1) = (h.edges[0], h.edges[h.edges.len() - 1]);
    let (x0, x1) = if x1 > x0 {
        (x0, x1)
    } else {
        (x0 - 0.5 * x0.abs().max(1e-12), x1 + 0.5 * x1.abs().max(1e-12))
    };
    let (w, top) = (x1 - x0, peak * 1.15);
    let (f, unit) = axis_unit(unit, x0.abs().max(x1.abs()));
    for (i, &c) in h.counts.iter().enumerate() {
        let (a, b) = (h.edges[i], h.edges[i + 1]);
        let (a, b) = if b > a { (a, b) } else { (x0, x1) };
        scene.items.push(Item::Polygon {
            points: vec![[a, 0.0], [b, 0.0], [b, c as f64], [a, c as f64]],
            role: Role::Curve,
            tag: format!("bin {i}"),
        });
    }
    let xs = nice_step_at_least(w / 4.0);
    let mut t = (x0 / xs).ceil() * xs;
    while t <= x1 + 1e-9 * w {
        scene.fixed_label(
            [t, -0.06 * top],
            tick(t * f, xs * f),
            10.0,
            Anchor::Middle,
            Role::Caption,
        );
        t += xs;
    }
    histogram_marks(&mut scene, summary, nominal, top, |v| resolved(v, f, summary.std, w));
    scene.items.push(Item::Polygon {
        points: vec![[x0, 0.0], [x1, 0.0], [x1, top], [x0, top]],
        role: Role::Frame,
        tag: "frame".into(),
    });
    scene.label(
        [0.5 * (x0 + x1), -0.16 * top],
        format!("{quantity} ({unit}) · σ {}", sig(summary.std * f, 3)),
        11.0,
        Anchor::Middle,
        Role::Label,
        Priority::Key,
    );
    scene.bounds = Rect {
        x0: x0 - 0.05 * w,
        y0: -0.22 * top,
        x1: x1 + 0.05 * w,
        y1: top * 1.05,
    };
    scene
}

/// `v` (data units) times `f`, with digits enough to tell a histogram's marks apart: down to a
/// tenth of the spread (`std`, or the range `w` when all samples agree).
fn resolved(v: f64, f: f64, std: f64, w: f64) -> String {
    let spread = if std > 0.0 { std } else { w };
    let top = (v.abs() * f).log10().floor();
    let bottom = (0.1 * spread * f).log10().floor();
    let n = if top.is_finite() && bottom.is_finite() {
        (top - bottom + 1.0).clamp(2.0, 8.0) as usize
    } else {
        4
    };
    sig(v * f, n)
}

/// Marks the 5th and 95th percentiles, the mean and the nominal value on a histogram `top` high,
/// each a dashed line with its value written by `resolved`.
fn histogram_marks(
    scene: &mut Scene,
    summary: &Summary,
    nominal: Option<f64>,
    top: f64,
    resolved: impl Fn(f64) -> String,
) {
    let mut marks: Vec<(f64, String, Role)> = vec![
        (summary.p5, format!("p5 {}", resolved(summary.p5)), Role::Grid),
        (summary.p95, format!("p95 {}", resolved(summary.p95)), Role::Grid),
        (summary.mean, format!("mean {}", resolved(summary.mean)), Role::Marker),
    ];
    if let Some(n) = nominal {
        marks.push((n, format!("nominal {}", resolved(n)), Role::Label));
    }
    for (k, (x, label, role)) in marks.iter().enumerate() {
        scene.line(
            vec![[*x, 0.0], [*x, top]],
            *role,
            vec![4.0, 3.0],
            1.2,
            format!("mark {label}"),
        );
        scene.text(
            [*x, top * (1.0 - 0.07 * k as f64)],
            label.clone(),
            10.0,
            Anchor::Start,
            *role,
        );
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::contract::scenario::Scenario;
    use crate::view::series::{separation_vs_wavelength, walkoff_vs_tilt};

    #[test]
    fn the_current_point_is_marked_at_its_value() {
        let sc = Scenario::from_json_str(include_str!("../../examples/demo.json")).unwrap();
        let s = walkoff_vs_tilt(&sc, 0).unwrap();
        let scene = plot(&s);
        assert!(scene.is_finite());
        let Some(Item::Dot { center, .. }) = scene.tagged("current").next() else {
            panic!()
        };
        assert_eq!(*center, s.current.unwrap());
        assert!(scene.texts().iter().any(|t| t == &"cut tilt (°)"));
        assert!(
            scene.texts().iter().any(|t| t.starts_with("6.189 ° at 45")),
            "{:?}",
            scene.texts()
        );
        let scene = plot(&separation_vs_wavelength(&sc, 0));
        assert!(scene.texts().iter().any(|t| t == &"wavelength (nm)"));
    }

    /// A series marks every one of its points, each labelled with its value; placed for a small
    /// panel, two labels that would collide keep one, never both on top of each other.
    #[test]
    fn every_marked_point_of_a_series_is_drawn() {
        let sc = Scenario::from_json_str(include_str!("../../examples/demo.json")).unwrap();
        let mut s = separation_vs_wavelength(&sc, 0);
        let (a, b) = (s.points[10], s.points[100]);
        s.current = None;
        s.markers = vec![a, b];
        let scene = plot(&s);
        let dots: Vec<[f64; 2]> = scene
            .tagged("marker")
            .filter_map(|i| match i {
                Item::Dot { center, .. } => Some(*center),
                _ => None,
            })
            .collect();
        assert_eq!(dots, vec![a, b]);
        let label = |p: [f64; 2]| format!("{} mm at {} nm", sig(p[1], 4), sig(p[0], 4));
        assert!(scene.texts().iter().any(|t| *t == label(a)), "{:?}", scene.texts());
        assert!(scene.texts().iter().any(|t| *t == label(b)), "{:?}", scene.texts());
        // Two neighbouring points: their labels would overlap; the placement keeps them apart.
        s.markers = vec![s.points[50], s.points[51]];
        let placed = crate::view::label_layout::layout(&plot(&s), 320.0, 200.0, 8.0);
        assert!(crate::view::label_layout::problems(&placed).is_empty());
    }

    #[test]
    fn histograms_hold_every_sample_and_mark_the_percentiles() {
        let mut rng = crate::random::Rng::new(2);
        let xs: Vec<f64> = (0..5000).map(|_| 2.0 + 0.01 * rng.normal()).collect();
        let s = crate::design::statistics::summarize(&xs, 30);
        let scene = histogram("Separation spread", "separation", "mm", &s, Some(2.0));
        assert!(scene.is_finite());
        let total: f64 = (0..30)
            .map(|i| match scene.tagged(&format!("bin {i}")).next() {
                Some(Item::Polygon { points, .. }) => points[2][1],
                _ => panic!("bin {i}"),
            })
            .sum();
        assert_eq!(total, 5000.0);
        assert!(scene.texts().iter().any(|t| t.starts_with("p95 ")));
        assert!(histogram("x", "y", "z", &crate::design::statistics::summarize(&[], 5), None).is_finite());
    }

    #[test]
    fn empty_and_flat_series_still_draw() {
        let sc = Scenario::from_json_str(r#"{"elements": [{"kind": "rotator", "angle_deg": 5}]}"#).unwrap();
        assert!(plot(&separation_vs_wavelength(&sc, 0)).is_finite());
        let sc = Scenario::from_json_str(
            r#"{"elements": [{"kind": "crystal", "no": 1.5, "ne": 1.6, "thickness_mm": 1, "axis": {"tilt_deg": 0}}]}"#,
        )
        .unwrap();
        let scene = plot(&separation_vs_wavelength(&sc, 0));
        assert!(scene.is_finite(), "a flat zero curve");
    }
}

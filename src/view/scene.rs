//! The display list: what a view shows, in the view's own physical units, for any renderer.
//!
//! A [`Scene`] is a flat list of [`Item`]s in *world* coordinates (millimetres for the side and
//! end views, data units for plots, the unit sphere for the Poincaré panel) plus the world
//! rectangle to show and how to fit it to a screen. The canvas renderer (web bindings) and the SVG
//! writer draw the same scene, and native tests inspect it: the e-ray's exit point in the side
//! view is a number in the scene, not a pixel.
//!
//! Conventions: world y points *up* (renderers flip it); text sizes are in CSS pixels, so that
//! labels stay legible at any zoom; colours are not in the scene, only semantic [`Role`]s, which
//! each renderer maps to its palette (light or dark). A text gives where it *wants* to be and a
//! [`Priority`]; the placement pass ([`crate::view::label_layout`]) decides, for one screen size, where
//! it goes or whether it is left out, so that no two labels overlap and none leaves the panel.
//! Numbers in labels come from [`crate::numfmt`].

use serde::Serialize;

/// A point in world coordinates.
pub type Point = [f64; 2];

/// What a drawn thing *is*; renderers pick colour and weight from it.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Role {
    /// The incident beam and rays in the outside medium before any crystal.
    Incident,
    /// An ordinary ray (solid line).
    ORay,
    /// An extraordinary ray (dashed line).
    ERay,
    /// A crystal plate outline and fill.
    Crystal,
    /// An ideal element (retarder, polarizer, rotator).
    Element,
    /// The optic axis mark.
    Axis,
    /// Dimension lines and their labels.
    Dimension,
    /// Angle arcs (walk-off) and their labels.
    Angle,
    /// Axes, ticks and frames of plots and panels.
    Frame,
    /// Grid lines.
    Grid,
    /// A plotted curve.
    Curve,
    /// The current operating point on a plot or sphere.
    Marker,
    /// The input state on the Poincaré sphere.
    InputState,
    /// Ordinary text.
    Label,
    /// Secondary text (captions, units).
    Caption,
    /// A spot outline in the end view.
    Spot,
    /// A polarization ellipse.
    Ellipse,
    /// A scale bar.
    ScaleBar,
    /// A warning mark or text.
    Warning,
}

/// Line dash pattern, in CSS pixels (on, off, …); empty for solid.
pub type Dash = Vec<f64>;

/// Horizontal anchoring of text.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Anchor {
    /// The point is the left end of the text.
    Start,
    /// The point is the centre of the text.
    Middle,
    /// The point is the right end of the text.
    End,
}

/// How much a label matters, for the placement pass: more important labels are placed first, and
/// small panels (embeds) leave out [`Priority::Detail`] labels altogether.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Priority {
    /// The view's main readout (a separation, an axis title): placed first.
    Key,
    /// Names and values a reader looks for (ray names, powers, scale bars, ticks).
    Normal,
    /// Secondary text (element names, axis letters, glyph notes): left out of small panels.
    Detail,
}

/// One drawn thing.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "type", rename_all = "kebab-case")]
pub enum Item {
    /// An open polyline.
    Polyline {
        /// Vertices.
        points: Vec<Point>,
        /// Semantic role.
        role: Role,
        /// Dash pattern (px).
        dash: Dash,
        /// Line width (px).
        width: f64,
        /// What it shows, for tests and accessibility (e.g. "ray e").
        tag: String,
    },
    /// A closed polygon, filled and outlined.
    Polygon {
        /// Vertices.
        points: Vec<Point>,
        /// Semantic role.
        role: Role,
        /// What it shows.
        tag: String,
    },
    /// A circle of world radius, outlined (and filled when `filled`).
    Circle {
        /// Centre.
        center: Point,
        /// Radius in world units.
        radius: f64,
        /// Semantic role.
        role: Role,
        /// Whether to fill it.
        filled: bool,
        /// What it shows.
        tag: String,
    },
    /// A dot of fixed screen size (markers, points on the sphere).
    Dot {
        /// Centre.
        center: Point,
        /// Radius in px.
        radius_px: f64,
        /// Semantic role.
        role: Role,
        /// Filled, or a ring.
        filled: bool,
        /// What it shows.
        tag: String,
    },
    /// A straight arrow with a head at `to`.
    Arrow {
        /// Tail.
        from: Point,
        /// Head.
        to: Point,
        /// Semantic role.
        role: Role,
        /// Head length (px).
        head_px: f64,
        /// What it shows.
        tag: String,
    },
    /// A rectangle filled with a given colour (a colour sample, such as the white-light colour
    /// of a spectrum), outlined as a frame. The one item whose colour is data, not a role.
    Swatch {
        /// One corner.
        from: Point,
        /// The opposite corner.
        to: Point,
        /// The fill, "#rrggbb".
        colour: String,
        /// What it shows.
        tag: String,
    },
    /// A grey image ([`Raster`]). Like [`Item::Swatch`], its shades are data, the same in every
    /// palette.
    Raster(Raster),
    /// Text at a world point.
    Text {
        /// Anchor point.
        at: Point,
        /// The text.
        text: String,
        /// Size (px).
        size_px: f64,
        /// Horizontal anchoring.
        anchor: Anchor,
        /// Semantic role.
        role: Role,
        /// How much it matters when space is short.
        priority: Priority,
        /// Whether the label must stay at its anchor (a tick label): it is left out rather than
        /// moved when its place is taken.
        fixed: bool,
    },
    /// A dimension line between two world points, with arrowheads at both ends and its value as
    /// a label. It is drawn only where it is long enough on screen to be read
    /// ([`crate::view::label_layout::MIN_DIMENSION_PX`]): an offset below the drawing's resolution
    /// gets no dimension line.
    Dimension {
        /// One end.
        from: Point,
        /// The other end.
        to: Point,
        /// The value, e.g. "1.36 mm".
        label: String,
        /// What it measures (e.g. "separation").
        tag: String,
    },
}

/// A grey image filling the world rectangle from `from` (bottom left) to `to` (top right):
/// `columns` × `rows` cells, row 0 at the top, each 0 (black) to 255 (white) or none (not drawn).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Raster {
    /// Bottom-left corner.
    pub from: Point,
    /// Top-right corner.
    pub to: Point,
    /// Cells per row.
    pub columns: usize,
    /// Rows.
    pub rows: usize,
    /// Shades row-major, row 0 at the top.
    pub grey: Vec<Option<u8>>,
    /// What it shows.
    pub tag: String,
}

impl Raster {
    /// Its top-left and bottom-right corners on screen.
    pub fn screen_corners(&self, vp: &Viewport) -> (Point, Point) {
        (vp.map([self.from[0], self.to[1]]), vp.map([self.to[0], self.from[1]]))
    }
}

/// How world units map to the screen.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Aspect {
    /// One world unit is the same length on both screen axes (drawings to scale).
    Equal,
    /// Each axis is stretched to fill the screen (plots).
    Free,
}

/// A world rectangle.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Rect {
    /// Left (smallest x).
    pub x0: f64,
    /// Bottom (smallest y).
    pub y0: f64,
    /// Right.
    pub x1: f64,
    /// Top.
    pub y1: f64,
}

impl Rect {
    /// Width.
    pub fn width(&self) -> f64 {
        self.x1 - self.x0
    }
    /// Height.
    pub fn height(&self) -> f64 {
        self.y1 - self.y0
    }
    /// The rectangle grown by `fx` of its width and `fy` of its height on each side.
    pub fn padded(&self, fx: f64, fy: f64) -> Rect {
        let (dx, dy) = (self.width() * fx, self.height() * fy);
        Rect {
            x0: self.x0 - dx,
            y0: self.y0 - dy,
            x1: self.x1 + dx,
            y1: self.y1 + dy,
        }
    }
    /// The smallest rectangle holding every point; a unit square at the origin for none.
    pub fn around(points: impl IntoIterator<Item = Point>) -> Rect {
        let mut r = Rect {
            x0: f64::INFINITY,
            y0: f64::INFINITY,
            x1: f64::NEG_INFINITY,
            y1: f64::NEG_INFINITY,
        };
        for [x, y] in points {
            if x.is_finite() && y.is_finite() {
                r.x0 = r.x0.min(x);
                r.x1 = r.x1.max(x);
                r.y0 = r.y0.min(y);
                r.y1 = r.y1.max(y);
            }
        }
        if !r.x0.is_finite() {
            return Rect {
                x0: 0.0,
                y0: 0.0,
                x1: 1.0,
                y1: 1.0,
            };
        }
        r
    }
    /// The same rectangle with zero extents widened to `min` (so that it can be scaled).
    pub fn at_least(&self, min_w: f64, min_h: f64) -> Rect {
        let mut r = *self;
        if r.width() < min_w {
            let c = 0.5 * (r.x0 + r.x1);
            r.x0 = c - 0.5 * min_w;
            r.x1 = c + 0.5 * min_w;
        }
        if r.height() < min_h {
            let c = 0.5 * (r.y0 + r.y1);
            r.y0 = c - 0.5 * min_h;
            r.y1 = c + 0.5 * min_h;
        }
        r
    }
}

/// A view ready to draw.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Scene {
    /// Short title shown with the view.
    pub title: String,
    /// One-line caption (e.g. "looking toward the source").
    pub caption: String,
    /// World rectangle to show.
    pub bounds: Rect,
    /// Scaling rule.
    pub aspect: Aspect,
    /// Vertical exaggeration applied to world y when drawing (1 = true scale); the scene's
    /// coordinates are always physical, and the caption says when this is not 1.
    pub y_stretch: f64,
    /// The items, drawn in order.
    pub items: Vec<Item>,
}

impl Scene {
    /// An empty scene.
    pub fn new(title: &str, caption: &str, aspect: Aspect) -> Scene {
        Scene {
            title: title.to_string(),
            caption: caption.to_string(),
            bounds: Rect {
                x0: 0.0,
                y0: 0.0,
                x1: 1.0,
                y1: 1.0,
            },
            aspect,
            y_stretch: 1.0,
            items: Vec::new(),
        }
    }

    /// Adds a label of `Priority::Normal` that the placement pass may move.
    pub fn text(&mut self, at: Point, text: impl Into<String>, size_px: f64, anchor: Anchor, role: Role) {
        self.push_text(at, text.into(), size_px, anchor, role, Priority::Normal, false);
    }

    /// Adds a label of the given priority that the placement pass may move.
    pub fn label(
        &mut self,
        at: Point,
        text: impl Into<String>,
        size_px: f64,
        anchor: Anchor,
        role: Role,
        priority: Priority,
    ) {
        self.push_text(at, text.into(), size_px, anchor, role, priority, false);
    }

    /// The one place a text item is made (the public adders are generic over the text; this is
    /// not, so that its code is compiled once).
    #[allow(clippy::too_many_arguments)]
    fn push_text(
        &mut self,
        at: Point,
        text: String,
        size_px: f64,
        anchor: Anchor,
        role: Role,
        priority: Priority,
        fixed: bool,
    ) {
        self.items.push(Item::Text {
            at,
            text,
            size_px,
            anchor,
            role,
            priority,
            fixed,
        });
    }

    /// Adds a label that stays at its anchor or is left out (tick labels).
    pub fn fixed_label(&mut self, at: Point, text: impl Into<String>, size_px: f64, anchor: Anchor, role: Role) {
        self.push_text(at, text.into(), size_px, anchor, role, Priority::Normal, true);
    }

    /// Adds a dimension line from `from` to `to` labelled `label`.
    pub fn dimension(&mut self, from: Point, to: Point, label: impl Into<String>, tag: impl Into<String>) {
        self.items.push(Item::Dimension {
            from,
            to,
            label: label.into(),
            tag: tag.into(),
        });
    }

    /// Adds a polyline.
    pub fn line(&mut self, points: Vec<Point>, role: Role, dash: Dash, width: f64, tag: impl Into<String>) {
        self.items.push(Item::Polyline {
            points,
            role,
            dash,
            width,
            tag: tag.into(),
        });
    }

    /// Items whose tag equals `tag` (for tests and for pointing at things).
    pub fn tagged<'a>(&'a self, tag: &'a str) -> impl Iterator<Item = &'a Item> + 'a {
        self.items.iter().filter(move |i| match i {
            Item::Polyline { tag: t, .. }
            | Item::Polygon { tag: t, .. }
            | Item::Circle { tag: t, .. }
            | Item::Dot { tag: t, .. }
            | Item::Arrow { tag: t, .. }
            | Item::Swatch { tag: t, .. }
            | Item::Raster(Raster { tag: t, .. })
            | Item::Dimension { tag: t, .. } => t == tag,
            Item::Text { .. } => false,
        })
    }

    /// All text items' strings and dimension labels, in order.
    pub fn texts(&self) -> Vec<&str> {
        self.items
            .iter()
            .filter_map(|i| match i {
                Item::Text { text, .. } | Item::Dimension { label: text, .. } => Some(text.as_str()),
                _ => None,
            })
            .collect()
    }

    /// Every coordinate in the scene is finite (a renderer can draw it).
    pub fn is_finite(&self) -> bool {
        let ok = |p: &Point| p[0].is_finite() && p[1].is_finite();
        let b = &self.bounds;
        [b.x0, b.y0, b.x1, b.y1].iter().all(|v| v.is_finite())
            && b.width() > 0.0
            && b.height() > 0.0
            && self.items.iter().all(|i| match i {
                Item::Polyline { points, .. } | Item::Polygon { points, .. } => points.iter().all(ok),
                Item::Circle { center, radius, .. } => ok(center) && radius.is_finite(),
                Item::Dot { center, .. } => ok(center),
                Item::Arrow { from, to, .. }
                | Item::Dimension { from, to, .. }
                | Item::Swatch { from, to, .. }
                | Item::Raster(Raster { from, to, .. }) => ok(from) && ok(to),
                Item::Text { at, .. } => ok(at),
            })
    }
}

/// The map from world coordinates to screen pixels (y down) that fits a scene into a box.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Viewport {
    /// Pixels per world unit along x.
    pub sx: f64,
    /// Pixels per world unit along y (already including the scene's stretch).
    pub sy: f64,
    /// Screen x of world x = 0.
    pub ox: f64,
    /// Screen y of world y = 0.
    pub oy: f64,
}

impl Viewport {
    /// Fits `scene` into a `width` × `height` pixel box with `margin` pixels on each side: equal
    /// scales (times the scene's stretch) for [`Aspect::Equal`], independent scales for
    /// [`Aspect::Free`]; centred.
    pub fn fit(scene: &Scene, width: f64, height: f64, margin: f64) -> Viewport {
        let b = scene.bounds;
        let (w, h) = ((width - 2.0 * margin).max(1.0), (height - 2.0 * margin).max(1.0));
        let (bw, bh) = (b.width().max(1e-300), b.height().max(1e-300));
        let (sx, sy) = match scene.aspect {
            Aspect::Free => (w / bw, h / bh),
            Aspect::Equal => {
                let stretch = if scene.y_stretch.is_finite() && scene.y_stretch > 0.0 {
                    scene.y_stretch
                } else {
                    1.0
                };
                let s = (w / bw).min(h / (bh * stretch));
                (s, s * stretch)
            }
        };
        let ox = margin + 0.5 * (w - sx * bw) - sx * b.x0;
        let oy = margin + 0.5 * (h - sy * bh) + sy * b.y1;
        Viewport { sx, sy, ox, oy }
    }

    /// Screen position of a world point.
    pub fn map(&self, p: Point) -> Point {
        [self.ox + self.sx * p[0], self.oy - self.sy * p[1]]
    }
}

/// The two back corners of an arrowhead (screen pixels) whose tip is `tip` on a shaft coming from
/// `tail`: `head_px` long, spread ±0.45 rad. Shared by the canvas and the SVG writer.
pub fn arrow_head(tail: Point, tip: Point, head_px: f64) -> [Point; 2] {
    let a = (tip[1] - tail[1]).atan2(tip[0] - tail[0]);
    let corner = |d: f64| [tip[0] - head_px * (a + d).cos(), tip[1] - head_px * (a + d).sin()];
    [corner(-0.45), corner(0.45)]
}

/// A "nice" length for a scale bar or tick step: 1, 2 or 5 × 10ⁿ, the largest not above `max`.
///
/// Degenerate case: a non-positive or non-finite `max` gives 1.
pub fn nice_step(max: f64) -> f64 {
    if !(max.is_finite() && max > 0.0) {
        return 1.0;
    }
    let p = 10f64.powf(max.log10().floor());
    for m in [5.0, 2.0, 1.0] {
        if m * p <= max {
            return m * p;
        }
    }
    p
}

/// The smallest "nice" step (1, 2 or 5 × 10ⁿ) not below `min`: tick spacing that keeps labels
/// apart.
///
/// Degenerate case: a non-positive or non-finite `min` gives 1.
pub fn nice_step_at_least(min: f64) -> f64 {
    if !(min.is_finite() && min > 0.0) {
        return 1.0;
    }
    let p = 10f64.powf(min.log10().floor());
    for m in [1.0, 2.0, 5.0, 10.0] {
        if m * p >= min * (1.0 - 1e-12) {
            return m * p;
        }
    }
    10.0 * p
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn nice_steps() {
        assert_eq!(nice_step(7.3), 5.0);
        assert_eq!(nice_step(0.031), 0.02);
        assert_eq!(nice_step(1.0), 1.0);
        assert_eq!(nice_step(f64::NAN), 1.0);
        assert_eq!(nice_step_at_least(394.0), 500.0);
        assert_eq!(nice_step_at_least(0.03), 0.05);
        assert_eq!(nice_step_at_least(1.0), 1.0);
    }

    #[test]
    fn arrow_heads_sit_behind_the_tip_symmetrically() {
        let [p, q] = arrow_head([0.0, 0.0], [10.0, 0.0], 5.0);
        assert!(
            (p[0] - q[0]).abs() < 1e-12 && (p[1] + q[1]).abs() < 1e-12,
            "mirror images about the shaft"
        );
        assert!((10.0 - p[0] - 5.0 * 0.45f64.cos()).abs() < 1e-12 && p[0] < 10.0);
    }

    #[test]
    fn rects_grow_and_never_collapse() {
        let r = Rect::around([[1.0, 1.0], [1.0, 1.0]]).at_least(2.0, 2.0);
        assert_eq!((r.width(), r.height()), (2.0, 2.0));
        let e = Rect::around(std::iter::empty());
        assert!(e.width() > 0.0);
    }
}

//! Labels that never collide: the placement pass that turns a scene's wished-for labels into
//! labels on a screen of one size, none overlapping another and none leaving the panel.
//!
//! A [`Scene`] says where each label would like to be (a world point, an anchor) and how much it
//! matters ([`Priority`]). For a panel of `width` × `height` CSS pixels, [`layout`] maps the scene
//! with the renderers' [`Viewport`], estimates each label's box from a per-character width model
//! of the font, and places the labels one by one, most important first: each goes to its wished
//! place if that is free and inside the panel, else to the nearest free place among a set of
//! nearby offsets (up to two lines away), else it is left out; a movable label also keeps off the
//! drawing's marks (dots and spot circles) unless it is a key label with no other place. A fixed
//! label (a tick value) is
//! never moved, only left out. Small panels (embeds narrower than [`SMALL_PANEL_WIDTH_PX`] or
//! lower than [`SMALL_PANEL_HEIGHT_PX`]) leave out [`Priority::Detail`] labels first. The
//! title and the caption are labels too (top left and bottom left; the caption wraps onto a
//! second line, then is cut with an ellipsis). A dimension line is drawn only where it is at
//! least [`MIN_DIMENSION_PX`] long on screen, and its value is placed as a key label.
//!
//! Text width model: the page draws with `system-ui, sans-serif`, which is DejaVu Sans on the
//! Debian machines the tests run on, and one of the narrower Segoe UI, San Francisco, Roboto or
//! Cantarell elsewhere. The widths below are DejaVu Sans advance widths in em, measured with
//! canvas `measureText` at 100 px in headless Chromium (they agree with the font's own hmtx
//! table); characters not listed count as 1 em (the widest common glyph, as for "…" and "@").
//! Every estimate is multiplied by [`WIDTH_MARGIN`] and padded by a pixel on each side, so that
//! a label drawn in any of these fonts stays inside its estimated box.

use crate::view::scene::{Anchor, Item, Point, Priority, Role, Scene, Viewport};

/// A dimension line shorter than this on screen is not drawn (two 7 px arrowheads need room).
pub const MIN_DIMENSION_PX: f64 = 16.0;

/// Panels narrower than this leave out [`Priority::Detail`] labels.
pub const SMALL_PANEL_WIDTH_PX: f64 = 400.0;

/// Panels lower than this leave out [`Priority::Detail`] labels.
pub const SMALL_PANEL_HEIGHT_PX: f64 = 220.0;

/// After this many movable labels of one priority found no place, the panel counts as full and
/// the rest of that priority is left out without a search (4096 ray names would otherwise each
/// try every place).
pub const GIVE_UP_AFTER: usize = 256;

/// At most this many marks (dots, spot circles) are kept clear of labels: beyond, the drawing is
/// too crowded for names anyway, and the search would slow down.
pub const MAX_MARKS: usize = 1024;

/// Labels keep this far from the panel's edges (px).
pub const INSET_PX: f64 = 2.0;

/// Safety factor on the estimated text width.
pub const WIDTH_MARGIN: f64 = 1.06;

/// Bold text (the title, weight 600) is at most this much wider than regular (DejaVu Sans Bold
/// measured 1.12 times the regular width on "Side view (x–z)").
pub const BOLD_FACTOR: f64 = 1.15;

/// Height above the baseline, in em (DejaVu Sans ascender, accents included).
pub const ASCENT_EM: f64 = 0.93;

/// Depth below the baseline, in em (DejaVu Sans descender).
pub const DESCENT_EM: f64 = 0.24;

/// Size of the title (px, weight 600).
pub const TITLE_PX: f64 = 13.0;

/// Size of the caption (px).
pub const CAPTION_PX: f64 = 11.0;

/// Text is drawn this far above its anchor point (px), so that it does not sit on the line it
/// names.
pub const BASELINE_LIFT_PX: f64 = 3.0;

/// DejaVu Sans advance widths of the printable ASCII characters (space to `~`), in thousandths
/// of an em (see the module header).
const ASCII_MILLI_EM: [u16; 95] = [
    318, 401, 460, 838, 636, 950, 780, 275, 390, 390, 500, 838, 318, 361, 318, 337, // space to /
    636, 636, 636, 636, 636, 636, 636, 636, 636, 636, 337, 337, 838, 838, 838, 531, // 0 to ?
    1000, 684, 686, 698, 770, 632, 575, 775, 752, 295, 295, 656, 557, 863, 748, 787, // @ to O
    603, 787, 695, 635, 611, 732, 684, 989, 685, 611, 685, 390, 337, 390, 838, 500, // P to _
    500, 613, 635, 550, 635, 615, 352, 635, 634, 278, 278, 579, 278, 974, 634, 612, // ` to o
    635, 635, 411, 521, 392, 634, 592, 818, 592, 592, 525, 636, 337, 636, 838, // p to ~
];

/// Advance width of `c` in DejaVu Sans, in em (see the module header).
pub fn char_width_em(c: char) -> f64 {
    let milli = match c {
        ' '..='~' => ASCII_MILLI_EM[c as usize - 32],
        '·' => 318,
        '⁰'..='⁹' | '¹' | '²' | '³' => 401,
        'ₒ' | 'ₑ' => 417,
        '°' | '–' => 500,
        '⁻' => 528,
        'Γ' => 557,
        'χ' => 578,
        'ρ' | 'σ' | 'µ' | '√' => 637,
        'ψ' => 660,
        'Δ' => 684,
        '±' | '×' | '−' | '→' | '↑' | '⊙' | '⊗' | '≥' | '≤' | '≈' => 838,
        _ => 1000,
    };
    f64::from(milli) / 1000.0
}

/// Estimated width in px of `text` drawn at `size_px` (the model of the module header, with its
/// margin and a pixel of padding on each side).
#[inline(never)] // one copy in the page's WebAssembly, not one per caller
pub fn text_width_px(text: &str, size_px: f64) -> f64 {
    let em: f64 = text.chars().map(char_width_em).sum();
    em * size_px * WIDTH_MARGIN + 2.0
}

/// An axis-aligned box on screen (px, y down).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BoxPx {
    /// Left.
    pub x0: f64,
    /// Top.
    pub y0: f64,
    /// Right.
    pub x1: f64,
    /// Bottom.
    pub y1: f64,
}

impl BoxPx {
    /// Whether the two boxes share any area (touching edges do not count).
    pub fn overlaps(&self, o: &BoxPx) -> bool {
        self.x0 < o.x1 && o.x0 < self.x1 && self.y0 < o.y1 && o.y0 < self.y1
    }

    /// Whether the box lies inside a `width` × `height` panel (edges included).
    pub fn inside(&self, width: f64, height: f64) -> bool {
        self.x0 >= 0.0 && self.y0 >= 0.0 && self.x1 <= width && self.y1 <= height
    }

    fn shifted(&self, dx: f64, dy: f64) -> BoxPx {
        BoxPx {
            x0: self.x0 + dx,
            y0: self.y0 + dy,
            x1: self.x1 + dx,
            y1: self.y1 + dy,
        }
    }
}

/// A label where it is drawn: left end of its baseline, in screen px.
#[derive(Debug, Clone, PartialEq)]
pub struct PlacedLabel {
    /// The text.
    pub text: String,
    /// Size (px).
    pub size_px: f64,
    /// Role (its colour).
    pub role: Role,
    /// Drawn bold (the title).
    pub bold: bool,
    /// Left end of the baseline.
    pub x: f64,
    /// Baseline.
    pub baseline: f64,
    /// The estimated box it occupies.
    pub bbox: BoxPx,
}

/// A dimension line long enough to draw, in screen px.
#[derive(Debug, Clone, PartialEq)]
pub struct DrawnDimension {
    /// One end.
    pub from: Point,
    /// The other end.
    pub to: Point,
    /// What it measures (the item's tag).
    pub tag: String,
}

/// A scene's labels placed for one screen size.
#[derive(Debug, Clone, PartialEq)]
pub struct Layout {
    /// The world-to-screen map the renderers use for everything else.
    pub viewport: Viewport,
    /// Panel width (px).
    pub width: f64,
    /// Panel height (px).
    pub height: f64,
    /// The labels that are drawn (the title and caption lines among them).
    pub labels: Vec<PlacedLabel>,
    /// The dimension lines that are drawn.
    pub dimensions: Vec<DrawnDimension>,
    /// The texts of the labels that were left out for want of room.
    pub left_out: Vec<String>,
}

/// How labels are placed.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Placement {
    /// Avoid collisions and the panel's edges (what the renderers use).
    Avoid,
    /// Every label at its wished place, none left out: the unplaced scene, for tests that show
    /// what the placement pass prevents.
    AsAnchored,
}

struct Request {
    text: String,
    size_px: f64,
    role: Role,
    bold: bool,
    priority: Priority,
    fixed: bool,
    /// Wished box.
    bbox: BoxPx,
    /// Where it went, once placed.
    placed: Option<BoxPx>,
}

/// The scene's labels placed for a `width` × `height` panel with `margin` px around the drawing
/// (see the module header).
pub fn layout(scene: &Scene, width: f64, height: f64, margin: f64) -> Layout {
    layout_with(scene, width, height, margin, Placement::Avoid)
}

/// The box of `text` whose baseline starts at (`x`, `baseline`).
fn text_box(text: &str, size_px: f64, bold: bool, x: f64, baseline: f64) -> BoxPx {
    let w = text_width_px(text, size_px) * if bold { BOLD_FACTOR } else { 1.0 };
    BoxPx {
        x0: x - 1.0,
        y0: baseline - ASCENT_EM * size_px - 1.0,
        x1: x - 1.0 + w,
        y1: baseline + DESCENT_EM * size_px + 1.0,
    }
}

/// `text` cut with an ellipsis to fit `max_px` at `size_px`.
pub fn truncate_to(text: &str, size_px: f64, max_px: f64) -> String {
    if text_width_px(text, size_px) <= max_px {
        return text.to_string();
    }
    let mut out = String::new();
    let mut width = text_width_px("…", size_px);
    for c in text.chars() {
        width += char_width_em(c) * size_px * WIDTH_MARGIN;
        if width > max_px {
            break;
        }
        out.push(c);
    }
    while out.ends_with(' ') {
        out.pop();
    }
    out.push('…');
    out
}

/// `text` broken at spaces into at most `max_lines` lines of at most `max_px`, the last cut with
/// an ellipsis when the text does not fit.
pub fn wrap(text: &str, size_px: f64, max_px: f64, max_lines: usize) -> Vec<String> {
    let mut lines: Vec<String> = vec![String::new()];
    for word in text.split(' ') {
        let full = lines.len() == max_lines;
        if let Some(line) = lines.last_mut() {
            let fits = text_width_px(line, size_px) + text_width_px(word, size_px) - 2.0
                + char_width_em(' ') * size_px * WIDTH_MARGIN
                <= max_px;
            if line.is_empty() || fits || full {
                if !line.is_empty() {
                    line.push(' ');
                }
                line.push_str(word);
                continue;
            }
        }
        lines.push(word.to_string());
    }
    if let Some(line) = lines.last_mut() {
        *line = truncate_to(line, size_px, max_px);
    }
    lines
}

/// A grid of cells over the panel, each listing the placed boxes that touch it.
struct Grid {
    cell: f64,
    cols: usize,
    rows: usize,
    cells: Vec<Vec<usize>>,
}

impl Grid {
    fn new(width: f64, height: f64) -> Grid {
        let cell = 48.0;
        let cols = (width / cell).ceil().clamp(1.0, 1000.0) as usize;
        let rows = (height / cell).ceil().clamp(1.0, 1000.0) as usize;
        let mut cells = Vec::new();
        cells.resize_with(cols * rows, Vec::new);
        Grid {
            cell,
            cols,
            rows,
            cells,
        }
    }

    fn range(&self, b: &BoxPx) -> (usize, usize, usize, usize) {
        let clamp_col = |x: f64| ((x / self.cell).floor().max(0.0) as usize).min(self.cols - 1);
        let clamp_row = |y: f64| ((y / self.cell).floor().max(0.0) as usize).min(self.rows - 1);
        (clamp_col(b.x0), clamp_col(b.x1), clamp_row(b.y0), clamp_row(b.y1))
    }

    fn free(&self, b: &BoxPx, boxes: &[BoxPx]) -> bool {
        let (c0, c1, r0, r1) = self.range(b);
        for r in r0..=r1 {
            for c in c0..=c1 {
                for &k in &self.cells[r * self.cols + c] {
                    if boxes[k].overlaps(b) {
                        return false;
                    }
                }
            }
        }
        true
    }

    fn insert(&mut self, b: &BoxPx, index: usize) {
        let (c0, c1, r0, r1) = self.range(b);
        for r in r0..=r1 {
            for c in c0..=c1 {
                self.cells[r * self.cols + c].push(index);
            }
        }
    }
}

/// The places tried for a movable label, nearest first: (dx in half box widths, dy in half
/// lines), up to half its width sideways and two lines up or down (farther, a label would name
/// the wrong thing; it is left out instead), ordered by the cost
/// 2 |dx| + 0.75 |dy| (a box is typically four lines wide, so moving up or down a line is
/// preferred to moving sideways by half the box). A table rather than a sort at run time, which
/// would add a sort's code to the page's WebAssembly.
#[rustfmt::skip]
const OFFSETS: [(i8, i8); 27] = [
    (0, 0), (0, -1), (0, 1), (0, -2), (0, 2), (-1, 0), (1, 0), (0, -3), (0, 3),
    (-1, -1), (1, -1), (-1, 1), (1, 1), (0, -4), (0, 4), (-1, -2), (1, -2), (-1, 2),
    (1, 2), (-1, -3), (1, -3), (-1, 3), (1, 3), (-1, -4), (1, -4), (-1, 4), (1, 4),
];

/// Offsets (px) tried for a movable label whose box is `w` × `h`, nearest first.
fn offsets(w: f64, h: f64) -> impl Iterator<Item = (f64, f64)> {
    let line = h + 2.0;
    OFFSETS
        .iter()
        .map(move |&(dx, dy)| (0.5 * f64::from(dx) * (w + 4.0), 0.5 * f64::from(dy) * line))
}

/// The box moved the least distance that puts it inside the panel's inset, if it fits at all.
#[inline(never)]
fn clamp_into(b: BoxPx, width: f64, height: f64) -> Option<BoxPx> {
    let (lo_x, hi_x, lo_y, hi_y) = (INSET_PX, width - INSET_PX, INSET_PX, height - INSET_PX);
    if b.x1 - b.x0 > hi_x - lo_x || b.y1 - b.y0 > hi_y - lo_y {
        return None;
    }
    // The shift that brings [a, b] inside [lo, hi] (the interval fits).
    let shift = |a: f64, b: f64, lo: f64, hi: f64| {
        if a < lo {
            lo - a
        } else if b > hi {
            hi - b
        } else {
            0.0
        }
    };
    let (dx, dy) = (shift(b.x0, b.x1, lo_x, hi_x), shift(b.y0, b.y1, lo_y, hi_y));
    Some(b.shifted(dx, dy))
}

impl Request {
    /// A label whose baseline starts at (`left`, `baseline`).
    #[allow(clippy::too_many_arguments)]
    #[inline(never)]
    fn new(
        text: String,
        size_px: f64,
        role: Role,
        bold: bool,
        priority: Priority,
        fixed: bool,
        left: f64,
        baseline: f64,
    ) -> Request {
        let bbox = text_box(&text, size_px, bold, left, baseline);
        Request {
            text,
            size_px,
            role,
            bold,
            priority,
            fixed,
            bbox,
            placed: None,
        }
    }
}

/// As [`layout`], with the placement rule chosen.
pub fn layout_with(scene: &Scene, width: f64, height: f64, margin: f64, placement: Placement) -> Layout {
    let vp = Viewport::fit(scene, width, height, margin);
    let mut requests = title_and_caption(scene, width, height);
    let dimensions = item_requests(scene, &vp, &mut requests);
    let mut placer = Placer {
        width,
        height,
        small: width < SMALL_PANEL_WIDTH_PX || height < SMALL_PANEL_HEIGHT_PX,
        marks: marks(scene, &vp, width, height),
        labels: BoxSet::new(width, height),
    };
    let left_out = placer.place_all(&mut requests, placement);
    let mut labels = Vec::new();
    for r in requests {
        if let Some(b) = r.placed {
            labels.push(PlacedLabel {
                baseline: b.y1 - 1.0 - DESCENT_EM * r.size_px,
                x: b.x0 + 1.0,
                text: r.text,
                size_px: r.size_px,
                role: r.role,
                bold: r.bold,
                bbox: b,
            });
        }
    }
    Layout {
        viewport: vp,
        width,
        height,
        labels,
        dimensions,
        left_out,
    }
}

/// The title and the caption's lines, fitted to the width, as fixed key labels.
fn title_and_caption(scene: &Scene, width: f64, height: f64) -> Vec<Request> {
    let mut requests: Vec<Request> = Vec::new();
    let room = (width - 16.0).max(10.0);
    let title = truncate_to(&scene.title, TITLE_PX, room / BOLD_FACTOR);
    requests.push(Request::new(
        title,
        TITLE_PX,
        Role::Label,
        true,
        Priority::Key,
        true,
        8.0,
        16.0,
    ));
    let lines = if scene.caption.is_empty() {
        Vec::new()
    } else {
        wrap(&scene.caption, CAPTION_PX, room, 2)
    };
    let step = (ASCENT_EM + DESCENT_EM) * CAPTION_PX + 3.0;
    let mut baseline = height - 8.0 - step * lines.len() as f64;
    for line in lines {
        baseline += step;
        requests.push(Request::new(
            line,
            CAPTION_PX,
            Role::Caption,
            false,
            Priority::Key,
            true,
            8.0,
            baseline,
        ));
    }
    requests
}

/// Adds a request for each text item and each dimension's label to `requests`, in the scene's
/// order; returns the dimensions long enough on screen to be drawn.
fn item_requests(scene: &Scene, vp: &Viewport, requests: &mut Vec<Request>) -> Vec<DrawnDimension> {
    let mut dimensions = Vec::new();
    for item in &scene.items {
        match item {
            Item::Text {
                at,
                text,
                size_px,
                anchor,
                role,
                priority,
                fixed,
            } => {
                let [x, y] = vp.map(*at);
                let w = text_width_px(text, *size_px);
                let left = match anchor {
                    Anchor::Start => x,
                    Anchor::Middle => x - 0.5 * w,
                    Anchor::End => x - w,
                };
                requests.push(Request::new(
                    text.clone(),
                    *size_px,
                    *role,
                    false,
                    *priority,
                    *fixed,
                    left,
                    y - BASELINE_LIFT_PX,
                ));
            }
            Item::Dimension { from, to, label, tag } => {
                let (a, b) = (vp.map(*from), vp.map(*to));
                let len = (b[0] - a[0]).hypot(b[1] - a[1]);
                if len.is_nan() || len < MIN_DIMENSION_PX {
                    continue;
                }
                dimensions.push(DrawnDimension {
                    from: a,
                    to: b,
                    tag: tag.clone(),
                });
                requests.push(dimension_request(a, b, label));
            }
            _ => {}
        }
    }
    dimensions
}

/// The label of a dimension from `a` to `b` (px): beside a steep line, above a flat one.
fn dimension_request(a: [f64; 2], b: [f64; 2], label: &str) -> Request {
    let mid = [0.5 * (a[0] + b[0]), 0.5 * (a[1] + b[1])];
    let size = 12.0;
    let (left, baseline) = if (b[1] - a[1]).abs() > (b[0] - a[0]).abs() {
        (mid[0] + 4.0, mid[1] + 0.35 * size)
    } else {
        (mid[0] - 0.5 * text_width_px(label, size), mid[1] - 4.0)
    };
    Request::new(
        label.to_string(),
        size,
        Role::Dimension,
        false,
        Priority::Key,
        false,
        left,
        baseline,
    )
}

/// The marks labels should not cover: dots (exit points, states, markers) and small circles
/// (spots), as boxes on screen.
fn marks(scene: &Scene, vp: &Viewport, width: f64, height: f64) -> BoxSet {
    let mut marks = BoxSet::new(width, height);
    for item in &scene.items {
        let (c, rx, ry) = match item {
            Item::Dot { center, radius_px, .. } => (vp.map(*center), *radius_px, *radius_px),
            Item::Circle { center, radius, .. } => (vp.map(*center), radius * vp.sx, radius * vp.sy),
            _ => continue,
        };
        if rx < width / 3.0 && ry < height / 3.0 && marks.boxes.len() < MAX_MARKS {
            marks.push(BoxPx {
                x0: c[0] - rx,
                y0: c[1] - ry,
                x1: c[0] + rx,
                y1: c[1] + ry,
            });
        }
    }
    marks
}

/// Boxes on the panel, with a grid to find those near a new one.
struct BoxSet {
    grid: Grid,
    boxes: Vec<BoxPx>,
}

impl BoxSet {
    /// No boxes yet, on a panel `width` × `height` px.
    fn new(width: f64, height: f64) -> BoxSet {
        BoxSet {
            grid: Grid::new(width, height),
            boxes: Vec::new(),
        }
    }

    /// Whether `b` overlaps none of the boxes.
    fn free(&self, b: &BoxPx) -> bool {
        self.grid.free(b, &self.boxes)
    }

    /// Adds `b`.
    fn push(&mut self, b: BoxPx) {
        self.grid.insert(&b, self.boxes.len());
        self.boxes.push(b);
    }
}

/// The placement pass: the panel, its marks and the labels placed so far.
struct Placer {
    width: f64,
    height: f64,
    /// A small panel, which leaves detail labels out.
    small: bool,
    marks: BoxSet,
    labels: BoxSet,
}

impl Placer {
    /// Places the requests, most important first, each priority in the scene's order; returns
    /// the texts left out.
    fn place_all(&mut self, requests: &mut [Request], placement: Placement) -> Vec<String> {
        let mut left_out = Vec::new();
        for priority in [Priority::Key, Priority::Normal, Priority::Detail] {
            let mut failures = 0;
            for r in requests.iter_mut() {
                if r.priority != priority {
                    continue;
                }
                if placement == Placement::AsAnchored {
                    r.placed = Some(r.bbox);
                    continue;
                }
                let found = if (self.small && priority == Priority::Detail) || failures >= GIVE_UP_AFTER {
                    // Left out of small panels, or of a panel already full.
                    None
                } else if r.fixed {
                    let fits = r.bbox.inside(self.width, self.height) && self.labels.free(&r.bbox);
                    fits.then_some(r.bbox)
                } else {
                    self.movable(r)
                };
                match found {
                    Some(b) => {
                        self.labels.push(b);
                        r.placed = Some(b);
                    }
                    None => {
                        left_out.push(r.text.clone());
                        // Tick labels fail one by one as they thin out; only names count.
                        if priority != Priority::Key && !r.fixed {
                            failures += 1;
                        }
                    }
                }
            }
        }
        left_out
    }

    /// The nearest place for a movable label clear of labels and marks; a key label that finds
    /// no such place may cover marks.
    fn movable(&self, r: &Request) -> Option<BoxPx> {
        for avoid_marks in [true, false] {
            if !avoid_marks && r.priority != Priority::Key {
                break;
            }
            for (dx, dy) in offsets(r.bbox.x1 - r.bbox.x0, r.bbox.y1 - r.bbox.y0) {
                if let Some(b) = clamp_into(r.bbox.shifted(dx, dy), self.width, self.height)
                    && self.labels.free(&b)
                    && (!avoid_marks || self.marks.free(&b))
                {
                    return Some(b);
                }
            }
        }
        None
    }
}

/// The first pair of overlapping labels and every label outside the panel, described; empty
/// when the layout is clean. Tests run it over many scenes and sizes.
pub fn problems(layout: &Layout) -> Vec<String> {
    let mut out = Vec::new();
    for l in &layout.labels {
        if !l.bbox.inside(layout.width, layout.height) {
            out.push(format!(
                "{:?} leaves the {}×{} panel: {:?}",
                l.text, layout.width, layout.height, l.bbox
            ));
        }
    }
    'pairs: for (i, a) in layout.labels.iter().enumerate() {
        for b in &layout.labels[i + 1..] {
            if a.bbox.overlaps(&b.bbox) {
                out.push(format!("{:?} overlaps {:?}", a.text, b.text));
                break 'pairs;
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::view::scene::{Aspect, Rect};

    #[test]
    fn the_width_model_matches_measured_strings() {
        // Widths measured with canvas measureText in headless Chromium, system-ui (DejaVu Sans):
        // the model must not fall short, nor overshoot by more than its margin and padding.
        for (text, size, measured) in [
            ("1.36 mm", 12.0, 53.91),
            ("ρ = 6.19°", 12.0, 58.02),
            ("1.2×10⁻⁵ mm", 12.0, 82.75),
            ("looking toward the source · x → right, y ↑", 11.0, 228.33),
        ] {
            let est = text_width_px(text, size);
            assert!(
                est >= measured && est <= measured * WIDTH_MARGIN + 3.0,
                "{text}: {est} px vs {measured} px"
            );
        }
        // Bold (weight 600, 13 px): "Side view (x–z)" measured 109.08 px.
        let bold = text_width_px("Side view (x–z)", 13.0) * BOLD_FACTOR;
        assert!(bold >= 109.08, "{bold}");
    }

    #[test]
    fn the_offsets_are_complete_and_nearest_first() {
        let cost = |o: &(i8, i8)| 2.0 * f64::from(o.0.abs()) + 0.75 * f64::from(o.1.abs());
        assert!(OFFSETS.windows(2).all(|w| cost(&w[0]) <= cost(&w[1])), "sorted");
        for dx in [-1i8, 0, 1] {
            for dy in [0i8, 1, 2, 3, 4] {
                for dy in [dy, -dy] {
                    assert_eq!(OFFSETS.iter().filter(|&&o| o == (dx, dy)).count(), 1, "({dx}, {dy})");
                }
            }
        }
        assert_eq!(OFFSETS[0], (0, 0));
    }

    #[test]
    fn captions_wrap_and_titles_truncate() {
        let lines = wrap("looking toward the source · x → right, y ↑", CAPTION_PX, 150.0, 2);
        assert_eq!(lines.len(), 2, "{lines:?}");
        assert!(lines.iter().all(|l| text_width_px(l, CAPTION_PX) <= 150.0), "{lines:?}");
        let t = truncate_to("a very long title that cannot fit", 13.0, 60.0);
        assert!(t.ends_with('…') && text_width_px(&t, 13.0) <= 60.0, "{t}");
        let lines = wrap(&"word ".repeat(100), CAPTION_PX, 100.0, 2);
        assert_eq!(lines.len(), 2);
        assert!(lines[1].ends_with('…'));
    }

    #[test]
    fn random_scenes_at_random_sizes_never_collide() {
        // Invariant over generated scenes: whatever the labels wish, the placed ones neither
        // overlap nor leave the panel.
        let mut rng = crate::random::Rng::new(7);
        let words = [
            "o",
            "eeoe",
            "1.36 mm",
            "ρ = 6.19°",
            "P 2.3×10⁻⁵",
            "a long caption of sorts",
            "⊙ c_y 0.43",
        ];
        for case in 0..200 {
            let mut s = unit_scene("Random", "caption words that may wrap onto two lines");
            let n = 1 + (rng.uniform() * 80.0) as usize;
            for k in 0..n {
                let at = [1.4 * rng.uniform() - 0.2, 1.4 * rng.uniform() - 0.2];
                let text = words[k % words.len()];
                let anchor = [Anchor::Start, Anchor::Middle, Anchor::End][k % 3];
                let priority = [Priority::Key, Priority::Normal, Priority::Detail][(k / 3) % 3];
                if k % 5 == 0 {
                    s.fixed_label(at, text, 10.0, anchor, Role::Caption);
                } else {
                    s.label(at, text, 8.0 + 8.0 * rng.uniform(), anchor, Role::Label, priority);
                }
            }
            let (w, h) = (240.0 + 1360.0 * rng.uniform(), 120.0 + 800.0 * rng.uniform());
            let lay = layout(&s, w, h, 28.0);
            assert!(
                problems(&lay).is_empty(),
                "case {case} at {w}×{h}: {:?}",
                problems(&lay)
            );
        }
    }

    /// An empty scene showing the unit square.
    fn unit_scene(title: &str, caption: &str) -> Scene {
        let mut s = Scene::new(title, caption, Aspect::Free);
        s.bounds = Rect {
            x0: 0.0,
            y0: 0.0,
            x1: 1.0,
            y1: 1.0,
        };
        s
    }

    fn crowded() -> Scene {
        let mut s = unit_scene("Crowded", "a caption");
        for k in 0..30 {
            s.text(
                [0.5, 0.5 + 1e-3 * k as f64],
                format!("label {k}"),
                12.0,
                Anchor::Middle,
                Role::Label,
            );
        }
        s.label(
            [0.99, 0.5],
            "at the right edge",
            12.0,
            Anchor::Start,
            Role::Label,
            Priority::Key,
        );
        s.label([0.5, 0.2], "detail", 12.0, Anchor::Start, Role::Label, Priority::Detail);
        s.dimension([0.1, 0.1], [0.1, 0.1 + 1e-9], "1 pm", "tiny");
        s.dimension([0.1, 0.1], [0.9, 0.1], "big", "big");
        s
    }

    #[test]
    fn crowded_labels_are_spread_or_left_out_never_stacked() {
        let scene = crowded();
        for (w, h) in [(240.0, 144.0), (640.0, 360.0), (1600.0, 900.0)] {
            let lay = layout(&scene, w, h, 28.0);
            assert!(problems(&lay).is_empty(), "{w}×{h}: {:?}", problems(&lay));
            assert!(
                lay.labels.iter().any(|l| l.text == "at the right edge"),
                "{w}×{h}: a key label is kept"
            );
            assert_eq!(lay.dimensions.len(), 1, "the sub-pixel dimension is not drawn");
            assert!(lay.labels.iter().all(|l| l.text != "1 pm"));
            let detail = lay.labels.iter().any(|l| l.text == "detail");
            assert_eq!(
                detail,
                w >= SMALL_PANEL_WIDTH_PX,
                "{w}×{h}: details only in large panels"
            );
        }
        // The same scene unplaced collides: what the pass prevents.
        let raw = layout_with(&scene, 640.0, 360.0, 28.0, Placement::AsAnchored);
        assert!(!problems(&raw).is_empty());
    }
}

//! Draws a [`Scene`] on an HTML canvas: the last step of the page, and the only one that touches
//! the canvas.
//!
//! The canvas is sized to its CSS box times the device pixel ratio, so lines and text stay crisp;
//! the scene is fitted with the same [`Viewport`] the SVG writer uses, its labels placed by the same
//! pass ([`layout`]), and coloured from the same [`Palette`].

use crate::view::label_layout::layout;
use crate::view::palette::Palette;
use crate::view::scene::{Item, Point, Raster, Role, Scene, Viewport, arrow_head};
use crate::view::svg::MARGIN_PX;
use wasm_bindgen::{Clamped, JsValue};
use web_sys::{CanvasRenderingContext2d, HtmlCanvasElement, ImageData};

/// Draws `scene` on `canvas`.
///
/// # Errors
/// A JavaScript error when the canvas has no 2-D context.
pub fn draw(scene: &Scene, canvas: &HtmlCanvasElement, palette: &Palette) -> Result<(), JsValue> {
    let (ctx, w, h) = prepare(canvas, palette)?;
    let lay = layout(scene, w, h, MARGIN_PX);
    let p = Painter {
        ctx: &ctx,
        vp: &lay.viewport,
        palette,
        empty: js_sys::Array::new(),
    };
    p.items(&scene.items)?;
    let c = palette.stroke(Role::Dimension);
    for d in &lay.dimensions {
        let mid = [0.5 * (d.from[0] + d.to[0]), 0.5 * (d.from[1] + d.to[1])];
        arrow(&ctx, mid, d.from, c, 7.0, 1.0);
        arrow(&ctx, mid, d.to, c, 7.0, 1.0);
    }
    ctx.set_text_align("start");
    // Labels come in runs of one font and colour: each is set when it changes only, since
    // setting a canvas font parses it anew even when it is the same.
    let mut font = None;
    let mut colour = "";
    for l in &lay.labels {
        if font != Some((l.bold, l.size_px)) {
            let weight = if l.bold { "600 " } else { "" };
            ctx.set_font(&format!("{weight}{}px system-ui, sans-serif", l.size_px));
            font = Some((l.bold, l.size_px));
        }
        let c = palette.stroke(l.role);
        if c != colour {
            ctx.set_fill_style_str(c);
            colour = c;
        }
        ctx.fill_text(&l.text, l.x, l.baseline)?;
    }
    Ok(())
}

/// Sizes `canvas` to its CSS box times the device pixel ratio and clears it to the background;
/// returns its context, scaled to CSS pixels, and its width and height in them.
fn prepare(canvas: &HtmlCanvasElement, palette: &Palette) -> Result<(CanvasRenderingContext2d, f64, f64), JsValue> {
    let window = web_sys::window().ok_or_else(|| JsValue::from_str("no window"))?;
    let dpr = window.device_pixel_ratio().clamp(1.0, 4.0);
    let (w, h) = (
        f64::from(canvas.client_width().max(50)),
        f64::from(canvas.client_height().max(50)),
    );
    let (pw, ph) = ((w * dpr).round() as u32, (h * dpr).round() as u32);
    if canvas.width() != pw || canvas.height() != ph {
        canvas.set_width(pw);
        canvas.set_height(ph);
    }
    let ctx: CanvasRenderingContext2d = canvas
        .get_context("2d")?
        .ok_or_else(|| JsValue::from_str("canvas has no 2-D context"))?
        .dyn_into_context()?;
    ctx.set_transform(dpr, 0.0, 0.0, dpr, 0.0, 0.0)?;
    ctx.set_fill_style_str(&palette.background);
    ctx.fill_rect(0.0, 0.0, w, h);
    Ok((ctx, w, h))
}

/// What drawing the items needs: the context, the scene's fit on screen, the colours, and an
/// empty dash pattern to reset to.
struct Painter<'a> {
    ctx: &'a CanvasRenderingContext2d,
    vp: &'a Viewport,
    palette: &'a Palette,
    empty: js_sys::Array,
}

impl Painter<'_> {
    /// Draws every item but texts and dimensions (those come from the layout). Runs of
    /// polylines (or dots) of one style are drawn as one path with one stroke: a stack of 12
    /// crystals has thousands of ray segments, and every call into the canvas costs.
    fn items(&self, items: &[Item]) -> Result<(), JsValue> {
        let mut k = 0;
        while k < items.len() {
            k = match &items[k] {
                Item::Polyline { .. } => self.polylines(items, k)?,
                Item::Dot { .. } => self.dots(items, k)?,
                item => {
                    self.single(item)?;
                    k + 1
                }
            };
        }
        Ok(())
    }

    /// Draws one polygon, circle or arrow (nothing for other kinds).
    fn single(&self, item: &Item) -> Result<(), JsValue> {
        let (ctx, vp, palette) = (self.ctx, self.vp, self.palette);
        match item {
            Item::Polygon { points, role, .. } => self.polygon(points, *role),
            Item::Circle {
                center,
                radius,
                role,
                filled,
                ..
            } => {
                let [x, y] = vp.map(*center);
                ctx.begin_path();
                ctx.ellipse(
                    x,
                    y,
                    (radius * vp.sx).max(0.5),
                    (radius * vp.sy).max(0.5),
                    0.0,
                    0.0,
                    std::f64::consts::TAU,
                )?;
                fill_and_stroke(ctx, palette, *role, *filled);
            }
            Item::Arrow {
                from,
                to,
                role,
                head_px,
                ..
            } => arrow(ctx, vp.map(*from), vp.map(*to), palette.stroke(*role), *head_px, 1.5),
            Item::Swatch { from, to, colour, .. } => {
                let corners = [*from, [to[0], from[1]], *to, [from[0], to[1]]];
                path(ctx, vp, &corners);
                ctx.close_path();
                ctx.set_fill_style_str(colour);
                ctx.fill();
                ctx.set_stroke_style_str(palette.stroke(Role::Frame));
                ctx.set_line_width(1.0);
                ctx.stroke();
            }
            Item::Raster(r) => self.raster(r)?,
            Item::Polyline { .. } | Item::Dot { .. } | Item::Text { .. } | Item::Dimension { .. } => {}
        }
        Ok(())
    }

    /// Draws a grey raster: its cells as the pixels of an image (transparent where a cell has no
    /// shade) drawn over its rectangle without smoothing, so each cell is a square of one grey.
    /// One image instead of a rectangle per run of equal shade: a 256 × 256 map with rings has
    /// tens of thousands of runs.
    fn raster(&self, r: &Raster) -> Result<(), JsValue> {
        use wasm_bindgen::JsCast;
        let ([x0, y0], [x1, y1]) = r.screen_corners(self.vp);
        let mut rgba = vec![0u8; r.columns * r.rows * 4];
        for (px, g) in rgba.chunks_exact_mut(4).zip(&r.grey) {
            if let Some(g) = *g {
                px.copy_from_slice(&[g, g, g, 255]);
            }
        }
        let (w, h) = (
            u32::try_from(r.columns).unwrap_or(0),
            u32::try_from(r.rows).unwrap_or(0),
        );
        let image = ImageData::new_with_u8_clamped_array_and_sh(Clamped(&rgba), w, h)?;
        let tile: HtmlCanvasElement = web_sys::window()
            .and_then(|win| win.document())
            .ok_or_else(|| JsValue::from_str("no document"))?
            .create_element("canvas")?
            .dyn_into()
            .map_err(|_| JsValue::from_str("not a canvas"))?;
        tile.set_width(w);
        tile.set_height(h);
        tile.get_context("2d")?
            .ok_or_else(|| JsValue::from_str("canvas has no 2-D context"))?
            .dyn_into_context()?
            .put_image_data(&image, 0.0, 0.0)?;
        self.ctx.set_image_smoothing_enabled(false);
        let drawn = self
            .ctx
            .draw_image_with_html_canvas_element_and_dw_and_dh(&tile, x0, y0, x1 - x0, y1 - y0);
        self.ctx.set_image_smoothing_enabled(true);
        drawn
    }

    /// Strokes the polyline `items[k]` and those after it of the same style as one path;
    /// returns the index of the first item not drawn.
    fn polylines(&self, items: &[Item], mut k: usize) -> Result<usize, JsValue> {
        let Some(Item::Polyline {
            points,
            role,
            dash,
            width,
            ..
        }) = items.get(k)
        else {
            return Ok(k + 1);
        };
        k += 1;
        let (ctx, vp) = (self.ctx, self.vp);
        let arr = js_sys::Array::new();
        for d in dash {
            arr.push(&JsValue::from_f64(*d));
        }
        ctx.set_line_dash(&arr)?;
        ctx.set_stroke_style_str(self.palette.stroke(*role));
        ctx.set_line_width(*width);
        ctx.begin_path();
        subpath(ctx, vp, points);
        while let Some(Item::Polyline {
            points: p,
            role: r,
            dash: d,
            width: w,
            ..
        }) = items.get(k)
        {
            if r != role || d != dash || w != width {
                break;
            }
            subpath(ctx, vp, p);
            k += 1;
        }
        ctx.stroke();
        ctx.set_line_dash(&self.empty)?;
        Ok(k)
    }

    /// Fills and outlines a polygon (nothing for no points).
    fn polygon(&self, points: &[Point], role: Role) {
        if points.is_empty() {
            return;
        }
        let ctx = self.ctx;
        path(ctx, self.vp, points);
        ctx.close_path();
        let fill = self.palette.fill(role);
        if fill != "none" {
            ctx.set_fill_style_str(fill);
            ctx.fill();
        }
        ctx.set_stroke_style_str(self.palette.stroke(role));
        ctx.set_line_width(1.0);
        ctx.stroke();
    }

    /// Draws the dot `items[k]` and those after it of the same style as one path; returns the
    /// index of the first item not drawn.
    fn dots(&self, items: &[Item], mut k: usize) -> Result<usize, JsValue> {
        let Some(Item::Dot {
            center,
            radius_px,
            role,
            filled,
            ..
        }) = items.get(k)
        else {
            return Ok(k + 1);
        };
        k += 1;
        let (ctx, vp) = (self.ctx, self.vp);
        ctx.begin_path();
        dot(ctx, vp, *center, *radius_px)?;
        while let Some(Item::Dot {
            center: c,
            radius_px: r,
            role: ro,
            filled: f,
            ..
        }) = items.get(k)
        {
            if ro != role || f != filled {
                break;
            }
            dot(ctx, vp, *c, *r)?;
            k += 1;
        }
        fill_and_stroke(ctx, self.palette, *role, *filled);
        Ok(k)
    }
}

/// An arrow (shaft and filled head) from `a` to `b`, screen px.
fn arrow(ctx: &CanvasRenderingContext2d, a: Point, b: Point, colour: &str, head_px: f64, width: f64) {
    ctx.set_stroke_style_str(colour);
    ctx.set_fill_style_str(colour);
    ctx.set_line_width(width);
    ctx.begin_path();
    ctx.move_to(a[0], a[1]);
    ctx.line_to(b[0], b[1]);
    ctx.stroke();
    let [p1, p2] = arrow_head(a, b, head_px);
    ctx.begin_path();
    ctx.move_to(b[0], b[1]);
    ctx.line_to(p1[0], p1[1]);
    ctx.line_to(p2[0], p2[1]);
    ctx.close_path();
    ctx.fill();
}

/// Fills the current path (when `filled`) and outlines it, in the role's colours.
fn fill_and_stroke(ctx: &CanvasRenderingContext2d, palette: &Palette, role: Role, filled: bool) {
    if filled {
        ctx.set_fill_style_str(palette.fill(role));
        ctx.fill();
    }
    ctx.set_stroke_style_str(palette.stroke(role));
    ctx.set_line_width(1.5);
    ctx.stroke();
}

/// Starts a path through `points` mapped to the screen (nothing for no points).
fn path(ctx: &CanvasRenderingContext2d, vp: &Viewport, points: &[Point]) {
    ctx.begin_path();
    subpath(ctx, vp, points);
}

/// A circle of `radius_px` at `center`, as its own subpath of the current path.
fn dot(
    ctx: &CanvasRenderingContext2d,
    vp: &Viewport,
    center: crate::view::scene::Point,
    radius_px: f64,
) -> Result<(), JsValue> {
    let [x, y] = vp.map(center);
    ctx.move_to(x + radius_px, y);
    ctx.arc(x, y, radius_px, 0.0, std::f64::consts::TAU)
}

/// Adds a subpath through `points` (a line needs two) to the current path.
fn subpath(ctx: &CanvasRenderingContext2d, vp: &Viewport, points: &[crate::view::scene::Point]) {
    if points.len() < 2 {
        return;
    }
    if let Some((first, rest)) = points.split_first() {
        let [x, y] = vp.map(*first);
        ctx.move_to(x, y);
        for p in rest {
            let [x, y] = vp.map(*p);
            ctx.line_to(x, y);
        }
    }
}

trait IntoContext {
    fn dyn_into_context(self) -> Result<CanvasRenderingContext2d, JsValue>;
}

impl IntoContext for js_sys::Object {
    fn dyn_into_context(self) -> Result<CanvasRenderingContext2d, JsValue> {
        use wasm_bindgen::JsCast;
        self.dyn_into::<CanvasRenderingContext2d>()
            .map_err(|_| JsValue::from_str("not a 2-D context"))
    }
}

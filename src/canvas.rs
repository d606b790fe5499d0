//! Draws a [`Scene`] on an HTML canvas: the last step of the page, and the only one that touches
//! the canvas.
//!
//! The canvas is sized to its CSS box times the device pixel ratio, so lines and text stay crisp;
//! the scene is fitted with the same [`Viewport`] the SVG writer uses, and coloured from the same
//! [`Palette`].

use crate::scene::{Anchor, Item, Scene, Viewport, arrow_head};
use crate::svg::Palette;
use wasm_bindgen::JsValue;
use web_sys::{CanvasRenderingContext2d, HtmlCanvasElement};

/// Margin around the drawing, CSS pixels.
pub const MARGIN_PX: f64 = 28.0;

/// Draws `scene` on `canvas`.
///
/// # Errors
/// A JavaScript error when the canvas has no 2-D context.
pub fn draw(scene: &Scene, canvas: &HtmlCanvasElement, palette: &Palette) -> Result<(), JsValue> {
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
    let vp = Viewport::fit(scene, w, h, MARGIN_PX);
    let empty = js_sys::Array::new();
    // Runs of polylines (or dots) of one style are drawn as one path with one stroke: a stack
    // of 12 crystals has thousands of ray segments, and every call into the canvas costs.
    let mut k = 0;
    while k < scene.items.len() {
        let item = &scene.items[k];
        k += 1;
        match item {
            Item::Polyline {
                points,
                role,
                dash,
                width,
                ..
            } => {
                let arr = js_sys::Array::new();
                for d in dash {
                    arr.push(&JsValue::from_f64(*d));
                }
                ctx.set_line_dash(&arr)?;
                ctx.set_stroke_style_str(palette.stroke(*role));
                ctx.set_line_width(*width);
                ctx.begin_path();
                subpath(&ctx, &vp, points);
                while let Some(Item::Polyline {
                    points: p,
                    role: r,
                    dash: d,
                    width: w,
                    ..
                }) = scene.items.get(k)
                {
                    if r != role || d != dash || w != width {
                        break;
                    }
                    subpath(&ctx, &vp, p);
                    k += 1;
                }
                ctx.stroke();
                ctx.set_line_dash(&empty)?;
            }
            Item::Polygon { points, role, .. } => {
                if points.is_empty() {
                    continue;
                }
                path(&ctx, &vp, points);
                ctx.close_path();
                let fill = palette.fill(*role);
                if fill != "none" {
                    ctx.set_fill_style_str(fill);
                    ctx.fill();
                }
                ctx.set_stroke_style_str(palette.stroke(*role));
                ctx.set_line_width(1.0);
                ctx.stroke();
            }
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
                fill_and_stroke(&ctx, palette, *role, *filled);
            }
            Item::Dot {
                center,
                radius_px,
                role,
                filled,
                ..
            } => {
                ctx.begin_path();
                dot(&ctx, &vp, *center, *radius_px)?;
                while let Some(Item::Dot {
                    center: c,
                    radius_px: r,
                    role: ro,
                    filled: f,
                    ..
                }) = scene.items.get(k)
                {
                    if ro != role || f != filled {
                        break;
                    }
                    dot(&ctx, &vp, *c, *r)?;
                    k += 1;
                }
                fill_and_stroke(&ctx, palette, *role, *filled);
            }
            Item::Arrow {
                from,
                to,
                role,
                head_px,
                ..
            } => {
                let ([x0, y0], [x1, y1]) = (vp.map(*from), vp.map(*to));
                let c = palette.stroke(*role);
                ctx.set_stroke_style_str(c);
                ctx.set_fill_style_str(c);
                ctx.set_line_width(1.5);
                ctx.begin_path();
                ctx.move_to(x0, y0);
                ctx.line_to(x1, y1);
                ctx.stroke();
                let [p1, p2] = arrow_head([x0, y0], [x1, y1], *head_px);
                ctx.begin_path();
                ctx.move_to(x1, y1);
                ctx.line_to(p1[0], p1[1]);
                ctx.line_to(p2[0], p2[1]);
                ctx.close_path();
                ctx.fill();
            }
            Item::Text {
                at,
                text,
                size_px,
                anchor,
                role,
                angle,
            } => {
                let [x, y] = vp.map(*at);
                ctx.set_font(&format!("{size_px}px system-ui, sans-serif"));
                ctx.set_text_align(match anchor {
                    Anchor::Start => "start",
                    Anchor::Middle => "center",
                    Anchor::End => "end",
                });
                ctx.set_fill_style_str(palette.stroke(*role));
                if *angle != 0.0 {
                    ctx.save();
                    ctx.translate(x, y - 3.0)?;
                    ctx.rotate(-angle)?;
                    ctx.fill_text(text, 0.0, 0.0)?;
                    ctx.restore();
                } else {
                    ctx.fill_text(text, x, y - 3.0)?;
                }
            }
        }
    }
    ctx.set_text_align("start");
    ctx.set_font("600 13px system-ui, sans-serif");
    ctx.set_fill_style_str(&palette.ink);
    ctx.fill_text(&scene.title, 8.0, 16.0)?;
    ctx.set_font("11px system-ui, sans-serif");
    ctx.set_fill_style_str(&palette.muted);
    ctx.fill_text(&scene.caption, 8.0, h - 8.0)?;
    Ok(())
}

/// Fills the current path (when `filled`) and outlines it, in the role's colours.
fn fill_and_stroke(ctx: &CanvasRenderingContext2d, palette: &Palette, role: crate::scene::Role, filled: bool) {
    if filled {
        ctx.set_fill_style_str(palette.fill(role));
        ctx.fill();
    }
    ctx.set_stroke_style_str(palette.stroke(role));
    ctx.set_line_width(1.5);
    ctx.stroke();
}

/// Starts a path through `points` mapped to the screen (nothing for no points).
fn path(ctx: &CanvasRenderingContext2d, vp: &Viewport, points: &[crate::scene::Point]) {
    ctx.begin_path();
    subpath(ctx, vp, points);
}

/// A circle of `radius_px` at `center`, as its own subpath of the current path.
fn dot(
    ctx: &CanvasRenderingContext2d,
    vp: &Viewport,
    center: crate::scene::Point,
    radius_px: f64,
) -> Result<(), JsValue> {
    let [x, y] = vp.map(center);
    ctx.move_to(x + radius_px, y);
    ctx.arc(x, y, radius_px, 0.0, std::f64::consts::TAU)
}

/// Adds a subpath through `points` (a line needs two) to the current path.
fn subpath(ctx: &CanvasRenderingContext2d, vp: &Viewport, points: &[crate::scene::Point]) {
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

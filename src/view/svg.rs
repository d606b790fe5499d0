//! An SVG writer for scenes: the same display list the canvas draws, as a standalone document.
//!
//! The SVG uses screen coordinates (pixels, y down) from [`crate::view::scene::Viewport::fit`], so its geometry can
//! be compared with the scene's world coordinates through the same map. Labels, the title, the
//! caption and the dimension lines are drawn where the placement pass ([`layout`]) put them for
//! this size, exactly as on the canvas. Colours come from a [`Palette`]; the document carries no
//! script and references nothing external.

use crate::view::label_layout::{DrawnDimension, Layout, layout};
use crate::view::palette::Palette;
use crate::view::png::{base64, grey_png};
use crate::view::scene::{Item, Point, Role, Scene, Viewport, arrow_head};
use std::fmt::Write;

fn esc(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}

/// A circle or ellipse (semi-axes `r` in pixels) at `c`, outlined in the role's colour.
fn round(out: &mut String, palette: &Palette, c: [f64; 2], r: [f64; 2], role: Role, filled: bool, tag: &str) {
    let fill = if filled { palette.fill(role) } else { "none" };
    let _ = write!(
        out,
        r#"<ellipse data-tag="{}" cx="{:.3}" cy="{:.3}" rx="{:.3}" ry="{:.3}" fill="{fill}" stroke="{}" stroke-width="1.5"/>"#,
        esc(tag),
        c[0],
        c[1],
        r[0],
        r[1],
        palette.stroke(role)
    );
}

/// An arrow (shaft and filled head) from `a` to `b`, screen px.
fn arrow(out: &mut String, a: Point, b: Point, colour: &str, head_px: f64, width: f64, tag: &str) {
    let ([x0, y0], [x1, y1]) = (a, b);
    let _ = write!(
        out,
        r#"<line data-tag="{}" x1="{x0:.3}" y1="{y0:.3}" x2="{x1:.3}" y2="{y1:.3}" stroke="{colour}" stroke-width="{width}"/>"#,
        esc(tag)
    );
    let [p1, p2] = arrow_head(a, b, head_px);
    let _ = write!(
        out,
        r#"<polygon points="{x1:.3},{y1:.3} {:.3},{:.3} {:.3},{:.3}" fill="{colour}"/>"#,
        p1[0], p1[1], p2[0], p2[1]
    );
}

/// Margin around the drawing, px (the canvas uses the same).
pub const MARGIN_PX: f64 = 28.0;

/// Writes `scene` as an SVG document of `width` × `height` pixels.
pub fn to_svg(scene: &Scene, width: f64, height: f64, palette: &Palette) -> String {
    let lay: Layout = layout(scene, width, height, MARGIN_PX);
    let mut out = String::new();
    let _ = write!(
        out,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" viewBox="0 0 {width} {height}" font-family="system-ui, sans-serif">"#
    );
    let _ = write!(
        out,
        r#"<title>{}</title><rect width="100%" height="100%" fill="{}"/>"#,
        esc(&scene.title),
        palette.background
    );
    for item in &scene.items {
        write_item(&mut out, item, &lay.viewport, palette);
    }
    for d in &lay.dimensions {
        dimension(&mut out, d, palette);
    }
    for l in &lay.labels {
        let weight = if l.bold { r#" font-weight="600""# } else { "" };
        let _ = write!(
            out,
            r#"<text x="{:.3}" y="{:.3}" font-size="{}"{weight} fill="{}">{}</text>"#,
            l.x,
            l.baseline,
            l.size_px,
            palette.stroke(l.role),
            esc(&l.text)
        );
    }
    out.push_str("</svg>\n");
    out
}

/// Writes one drawn item (texts and dimensions are written from the layout instead). A flat
/// match over the item kinds, each arm one element.
fn write_item(out: &mut String, item: &Item, vp: &Viewport, palette: &Palette) {
    match item {
        Item::Polyline {
            points,
            role,
            dash,
            width: w,
            tag,
        } => {
            let dash = dash_attr(dash);
            let _ = write!(
                out,
                r#"<polyline data-tag="{}" points="{}" fill="none" stroke="{}" stroke-width="{w}"{dash}/>"#,
                esc(tag),
                screen_points(points, vp),
                palette.stroke(*role)
            );
        }
        Item::Polygon { points, role, tag } => {
            let _ = write!(
                out,
                r#"<polygon data-tag="{}" points="{}" fill="{}" stroke="{}" stroke-width="1"/>"#,
                esc(tag),
                screen_points(points, vp),
                palette.fill(*role),
                palette.stroke(*role)
            );
        }
        Item::Circle {
            center,
            radius,
            role,
            filled,
            tag,
        } => {
            let r = [radius * vp.sx, radius * vp.sy];
            round(out, palette, vp.map(*center), r, *role, *filled, tag)
        }
        Item::Dot {
            center,
            radius_px,
            role,
            filled,
            tag,
        } => {
            let r = [*radius_px, *radius_px];
            round(out, palette, vp.map(*center), r, *role, *filled, tag)
        }
        Item::Arrow {
            from,
            to,
            role,
            head_px,
            tag,
        } => arrow(
            out,
            vp.map(*from),
            vp.map(*to),
            palette.stroke(*role),
            *head_px,
            1.5,
            tag,
        ),
        Item::Swatch { from, to, colour, tag } => {
            let corners = [*from, [to[0], from[1]], *to, [from[0], to[1]]];
            let _ = write!(
                out,
                r#"<polygon data-tag="{}" points="{}" fill="{}" stroke="{}" stroke-width="1"/>"#,
                esc(tag),
                screen_points(&corners, vp),
                esc(colour),
                palette.stroke(Role::Frame)
            );
        }
        Item::Raster(r) => {
            let ([x0, y0], [x1, y1]) = r.screen_corners(vp);
            let _ = write!(
                out,
                r#"<image data-tag="{}" x="{x0:.3}" y="{y0:.3}" width="{:.3}" height="{:.3}" preserveAspectRatio="none" style="image-rendering:pixelated" href="data:image/png;base64,{}"/>"#,
                esc(&r.tag),
                x1 - x0,
                y1 - y0,
                base64(&grey_png(r.columns, r.rows, &r.grey))
            );
        }
        Item::Text { .. } | Item::Dimension { .. } => {}
    }
}

/// A dash pattern (px) as a `stroke-dasharray` attribute with its leading space; empty for a
/// solid line.
fn dash_attr(dash: &[f64]) -> String {
    if dash.is_empty() {
        String::new()
    } else {
        format!(
            r#" stroke-dasharray="{}""#,
            dash.iter().map(|d| d.to_string()).collect::<Vec<_>>().join(" ")
        )
    }
}

/// World points as an SVG `points` list on screen ("x,y x,y …", px to 0.001).
fn screen_points(points: &[Point], vp: &Viewport) -> String {
    let pts: Vec<String> = points
        .iter()
        .map(|p| vp.map(*p))
        .map(|[x, y]| format!("{x:.3},{y:.3}"))
        .collect();
    pts.join(" ")
}

/// Writes a placed dimension: its line and an arrow from its middle to each end.
fn dimension(out: &mut String, d: &DrawnDimension, palette: &Palette) {
    let c = palette.stroke(Role::Dimension);
    let mid = [0.5 * (d.from[0] + d.to[0]), 0.5 * (d.from[1] + d.to[1])];
    let _ = write!(
        out,
        r#"<polyline data-tag="{}" points="{:.3},{:.3} {:.3},{:.3}" fill="none" stroke="{c}" stroke-width="1"/>"#,
        esc(&d.tag),
        d.from[0],
        d.from[1],
        d.to[0],
        d.to[1]
    );
    for end in [d.from, d.to] {
        arrow(out, mid, end, c, 7.0, 1.0, &format!("{} end", d.tag));
    }
}

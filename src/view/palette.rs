//! Colours: each semantic [`Role`] of a scene as a CSS colour, in a light and a dark scheme.
//!
//! Scenes carry roles, never colours; the canvas renderer and the SVG writer both ask a
//! [`Palette`] here, so a view looks the same on the page, in an export and from the command line.
//! Both schemes keep text at 4.5:1 or more against their background and rays, curves and marks
//! at 3:1 or more (WCAG 2.1 criteria 1.4.3 and 1.4.11; tested below); the secondary text shares
//! the page's own muted colours.

use crate::view::scene::Role;

/// Colours for each role, as CSS colour strings.
#[derive(Debug, Clone, PartialEq)]
pub struct Palette {
    /// Background.
    pub background: String,
    /// Foreground text and frames.
    pub ink: String,
    /// Secondary text, grids.
    pub muted: String,
    /// o-rays.
    pub o_ray: String,
    /// e-rays.
    pub e_ray: String,
    /// The incident beam.
    pub incident: String,
    /// Crystal fill.
    pub crystal_fill: String,
    /// Crystal outline.
    pub crystal_edge: String,
    /// Optic axis.
    pub axis: String,
    /// Dimensions and angles.
    pub dimension: String,
    /// Curves and markers on plots.
    pub curve: String,
    /// The current point.
    pub marker: String,
    /// Warnings.
    pub warning: String,
}

impl Palette {
    /// The scheme for a dark or a light surrounding: the one place that chooses.
    pub fn for_scheme(dark: bool) -> Palette {
        if dark { Palette::dark() } else { Palette::light() }
    }

    /// The light scheme (also the page's default).
    pub fn light() -> Palette {
        Palette {
            background: "#fbfaf7".into(),
            ink: "#1d232b".into(),
            muted: "#5b626a".into(),
            o_ray: "#0f6e8c".into(),
            e_ray: "#b3471d".into(),
            incident: "#5b6470".into(),
            crystal_fill: "rgba(120, 160, 190, 0.16)".into(),
            crystal_edge: "#6f8ea8".into(),
            axis: "#6a4c93".into(),
            dimension: "#2f3a45".into(),
            curve: "#0f6e8c".into(),
            marker: "#b3471d".into(),
            warning: "#a15c00".into(),
        }
    }

    /// The dark scheme.
    pub fn dark() -> Palette {
        Palette {
            background: "#15191e".into(),
            ink: "#e6e9ed".into(),
            muted: "#99a2ab".into(),
            o_ray: "#5cc3e0".into(),
            e_ray: "#f08a5d".into(),
            incident: "#aab3bd".into(),
            crystal_fill: "rgba(120, 170, 210, 0.14)".into(),
            crystal_edge: "#7fa6c6".into(),
            axis: "#b99be0".into(),
            dimension: "#d5dbe1".into(),
            curve: "#5cc3e0".into(),
            marker: "#f08a5d".into(),
            warning: "#e0a040".into(),
        }
    }

    /// Stroke colour of a role.
    pub fn stroke(&self, role: Role) -> &str {
        match role {
            Role::ORay => &self.o_ray,
            Role::ERay => &self.e_ray,
            Role::Incident => &self.incident,
            Role::Crystal => &self.crystal_edge,
            Role::Element | Role::Frame | Role::Label | Role::ScaleBar => &self.ink,
            Role::Axis => &self.axis,
            Role::Dimension | Role::Angle => &self.dimension,
            Role::Grid | Role::Caption => &self.muted,
            Role::Curve | Role::Spot | Role::Ellipse => &self.curve,
            Role::Marker | Role::InputState => &self.marker,
            Role::Warning => &self.warning,
        }
    }

    /// Fill colour of a role (for polygons, filled circles, dots).
    pub fn fill(&self, role: Role) -> &str {
        match role {
            Role::Crystal => &self.crystal_fill,
            Role::Frame | Role::Grid => "none",
            other => self.stroke(other),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// WCAG 2.1 relative luminance of a `#rrggbb` colour (sRGB, its published formula).
    fn luminance(hex: &str) -> f64 {
        let c = |i: usize| {
            let v = f64::from(u8::from_str_radix(&hex[i..i + 2], 16).unwrap()) / 255.0;
            if v <= 0.03928 {
                v / 12.92
            } else {
                ((v + 0.055) / 1.055).powf(2.4)
            }
        };
        0.2126 * c(1) + 0.7152 * c(3) + 0.0722 * c(5)
    }

    fn contrast(a: &str, b: &str) -> f64 {
        let (x, y) = (luminance(a), luminance(b));
        (x.max(y) + 0.05) / (x.min(y) + 0.05)
    }

    /// Text at least 4.5:1 against the background (WCAG 2.1, success criterion 1.4.3, level AA);
    /// rays, curves and marks at least 3:1 (criterion 1.4.11, non-text contrast).
    #[test]
    fn both_schemes_read_against_their_background() {
        for dark in [false, true] {
            let p = Palette::for_scheme(dark);
            for (name, c) in [("ink", &p.ink), ("muted", &p.muted), ("warning", &p.warning)] {
                let r = contrast(c, &p.background);
                assert!(r >= 4.5, "dark={dark} {name}: {r:.2}");
            }
            for (name, c) in [
                ("o_ray", &p.o_ray),
                ("e_ray", &p.e_ray),
                ("incident", &p.incident),
                ("axis", &p.axis),
                ("dimension", &p.dimension),
                ("curve", &p.curve),
                ("marker", &p.marker),
                ("crystal_edge", &p.crystal_edge),
            ] {
                let r = contrast(c, &p.background);
                assert!(r >= 3.0, "dark={dark} {name}: {r:.2}");
            }
        }
    }
}

//! Shop guidance on a designed part: the sizes a crystal shop would question before quoting.
//!
//! These are notes, not errors: the physics of a 10 µm plate or a 150 mm crystal is the same as
//! of any other, but making, handling or buying one is not. The figures are common practice and
//! approximate, gathered from general experience of polished crystal optics rather than from any
//! one source:
//!
//! - a free-standing plate thinner than about 0.1 mm is fragile and hard to polish flat; thinner
//!   retarders are usually cemented or optically contacted to a substrate, or made as a compound
//!   zero-order pair;
//! - a crystal longer than about 100 mm is rarely grown and polished in one piece;
//! - each material is commonly offered up to a typical clear aperture, set by the size of the
//!   boules (or natural pieces) it is cut from; beyond it, expect to ask specially.

use crate::contract::scenario::Medium;

/// Free-standing plates thinner than this (mm) get a note (common practice, approximate).
pub const THIN_PLATE_MM: f64 = 0.1;

/// Crystals longer than this (mm) get a note (common practice, approximate).
pub const LONG_CRYSTAL_MM: f64 = 100.0;

/// The clear aperture (mm) each catalogued material is commonly offered up to (common practice,
/// approximate): natural optical calcite in pieces of about 30 mm; grown quartz and MgF2 to about
/// 50 mm; YVO4 and alpha-BBO boules give about 20 mm; sapphire about 100 mm; lithium niobate
/// wafers about 75 mm; rutile boules about 15 mm.
pub const COMMON_APERTURE_MM: [(&str, f64); 8] = [
    ("calcite", 30.0),
    ("quartz", 50.0),
    ("yvo4", 20.0),
    ("alpha-bbo", 20.0),
    ("sapphire", 100.0),
    ("mgf2", 50.0),
    ("linbo3", 75.0),
    ("rutile", 15.0),
];

/// A length for a note: three significant digits, in mm.
fn mm(x: f64) -> String {
    crate::numfmt::sig(x, 3)
}

/// The notes on a part made of `plates` (material, thickness along the beam in mm, in the order
/// the light meets them), cut to a clear aperture of `clear_aperture_mm` where the design sets
/// one. Plates are numbered from 1. Empty when nothing would be questioned.
pub fn notes(plates: &[(Medium, f64)], clear_aperture_mm: Option<f64>) -> Vec<String> {
    let mut out = Vec::new();
    // Plates of one material and one size share a note ("plates 1, 2 and 3 (calcite) are …").
    let grouped = |too: &dyn Fn(f64) -> bool| -> Vec<(String, &str, String)> {
        let mut groups: Vec<(Vec<usize>, &str, String)> = Vec::new();
        for (i, (m, t)) in plates.iter().enumerate().filter(|(_, (_, t))| too(*t)) {
            let size = mm(*t);
            match groups.iter_mut().find(|g| g.1 == m.key() && g.2 == size) {
                Some(g) => g.0.push(i),
                None => groups.push((vec![i], m.key(), size)),
            }
        }
        groups
            .into_iter()
            .map(|(idx, key, size)| {
                let who = match (plates.len(), idx.as_slice()) {
                    (1, _) => "the plate is".to_string(),
                    (_, [i]) => format!("plate {} is", i + 1),
                    (_, [init @ .., last]) => {
                        let init: Vec<String> = init.iter().map(|i| (i + 1).to_string()).collect();
                        format!("plates {} and {} are", init.join(", "), last + 1)
                    }
                    (_, []) => String::new(),
                };
                (who, key, size)
            })
            .collect()
    };
    for (who, key, size) in grouped(&|t| t < THIN_PLATE_MM) {
        let (subject, verb) = who.rsplit_once(' ').unwrap_or((&who, "is"));
        out.push(format!(
            "{subject} ({key}) {verb} {size} mm thick, thinner than about {THIN_PLATE_MM} mm: a free-standing \
             plate this thin is fragile and hard to polish flat; such plates are usually \
             cemented or optically contacted to a substrate, or made as a compound zero-order \
             pair (guidance, common practice)"
        ));
    }
    for (who, key, size) in grouped(&|t| t > LONG_CRYSTAL_MM) {
        let (subject, verb) = who.rsplit_once(' ').unwrap_or((&who, "is"));
        out.push(format!(
            "{subject} ({key}) {verb} {size} mm long, longer than about {LONG_CRYSTAL_MM} mm: crystals this long \
             are rarely grown and polished in one piece; a material with more birefringence, \
             or several shorter pieces, may be easier to obtain (guidance, common practice)"
        ));
    }
    if let Some(a) = clear_aperture_mm {
        let mut seen: Vec<&str> = Vec::new();
        for (m, _) in plates {
            let Medium::Catalogue(c) = m else { continue };
            let Some(&(_, common)) = COMMON_APERTURE_MM.iter().find(|(k, _)| *k == c.key) else {
                continue;
            };
            if a > common && !seen.contains(&c.key) {
                seen.push(c.key);
                out.push(format!(
                    "the clear aperture of {} mm is beyond the roughly {common} mm that {} is \
                     commonly offered in (common practice, approximate): ask before ordering, or \
                     use a smaller beam or separation",
                    mm(a),
                    c.name
                ));
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::optics::material::{Indices, catalogue, find};

    fn cat(key: &str) -> Medium {
        Medium::Catalogue(find(key).expect("catalogued"))
    }

    #[test]
    fn every_catalogued_material_has_a_common_aperture() {
        for m in catalogue() {
            assert!(COMMON_APERTURE_MM.iter().any(|(k, _)| *k == m.key), "{}", m.key);
        }
    }

    #[test]
    fn thin_long_and_wide_parts_get_a_note_and_ordinary_ones_none() {
        assert!(notes(&[(cat("calcite"), 10.0)], Some(5.0)).is_empty());
        assert!(notes(&[(cat("quartz"), THIN_PLATE_MM)], None).is_empty());
        let thin = notes(&[(cat("quartz"), 0.0175)], None);
        assert_eq!(thin.len(), 1);
        assert!(
            thin[0].contains("0.0175 mm thick") && thin[0].contains("quartz"),
            "{}",
            thin[0]
        );
        let long = notes(&[(cat("quartz"), 150.0)], None);
        assert!(long.len() == 1 && long[0].contains("150 mm long"), "{long:?}");
        // One aperture note per material, whatever the number of plates.
        let wide = notes(&[(cat("rutile"), 1.0), (cat("rutile"), 1.0)], Some(16.0));
        assert!(wide.len() == 1 && wide[0].contains("rutile (TiO2)"), "{wide:?}");
        // Custom crystals have no common size: no aperture note.
        let custom = Medium::Custom(Indices::new(1.6, 1.5).expect("valid"));
        assert!(notes(&[(custom, 1.0)], Some(500.0)).is_empty());
        // Plates are numbered from 1 when there are several.
        let two = notes(&[(cat("mgf2"), 1.0), (cat("mgf2"), 0.05)], None);
        assert!(two[0].starts_with("plate 2 "), "{two:?}");
    }
}

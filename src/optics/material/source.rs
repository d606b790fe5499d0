//! Dispersion sources: where several published formulas exist for one crystal, which one is used,
//! what wavelength each was fitted in, and how far they disagree.
//!
//! Physics. Two formulas fitted to different measurements of one crystal differ by their
//! measurement errors, by the crystals' growth and purity, and by the temperature and the air
//! they were measured in. Their difference at a wavelength is the honest uncertainty of an index
//! taken from either: the *spread* here is, for each principal index and for the birefringence,
//! the largest value minus the smallest over the sources whose published range holds the
//! wavelength (an extrapolated formula says nothing about the crystal there and is left out).
//! Birefringence is n_e − n_o (uniaxial) or n_z − n_x (biaxial: the largest difference).
//!
//! Conventions. Each catalogue crystal has a default source (the first, its catalogue entry) and
//! may have others; a source is named by a short key, the first author and year, e.g.
//! `ghosh-1999`. Every source keeps the crystal's key, name, sign and temperature data (the
//! thermo-optic data of `thermal` are the crystal's, whichever source gives its 20 °C indices).
//! Each formula records the wavelength it was fitted in, [`FittedIn`]; the catalogue hands every
//! formula the vacuum wavelength (see `uniaxial` on why no air correction is applied), which is
//! exact for `vacuum` and off by the air's index, about 3·10⁻⁴ in λ, for `air`.
//!
//! Sources: each alternative formula is cited beside its coefficients in `uniaxial` and
//! `biaxial`; the spread is a plain difference, with no source of its own.

use super::{BiaxialMaterial, Material, Quantity, principal_values};
use crate::optics::wavelength::Wavelength;

/// The wavelength a dispersion formula was fitted in, as its source states it.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FittedIn {
    /// Wavelengths in standard air.
    Air,
    /// Vacuum wavelengths.
    Vacuum,
    /// The source (as far as it was seen) does not say.
    NotStated,
}

impl FittedIn {
    /// The contract's spelling: `air`, `vacuum` or `not stated`.
    pub fn as_str(self) -> &'static str {
        match self {
            FittedIn::Air => "air",
            FittedIn::Vacuum => "vacuum",
            FittedIn::NotStated => "not stated",
        }
    }
}

/// How far a crystal's published sources disagree at one wavelength.
#[derive(Debug, Clone, PartialEq)]
pub struct Spread {
    /// The sources compared (those whose range holds the wavelength and whose formulas give an
    /// index there), default first when it is among them.
    pub sources: Vec<&'static str>,
    /// Largest minus smallest value of each principal index: `[n_o, n_e]` or `[n_x, n_y, n_z]`.
    pub principal: Vec<f64>,
    /// Largest minus smallest birefringence (n_e − n_o, or n_z − n_x).
    pub birefringence: f64,
}

/// Largest minus smallest of each column of `rows` (principal values, one row per source) and of
/// the last-minus-first difference; `None` with fewer than two rows.
fn spread_of(names: Vec<&'static str>, rows: &[Vec<f64>]) -> Option<Spread> {
    if rows.len() < 2 {
        return None;
    }
    let range = |f: &dyn Fn(&Vec<f64>) -> f64| {
        let (lo, hi) = rows
            .iter()
            .map(f)
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), v| (lo.min(v), hi.max(v)));
        hi - lo
    };
    let width = rows[0].len();
    Some(Spread {
        sources: names,
        principal: (0..width).map(|i| range(&|r: &Vec<f64>| r[i])).collect(),
        birefringence: range(&|r: &Vec<f64>| r[width - 1] - r[0]),
    })
}

/// Whether `range_nm` holds the wavelength `nm`.
fn holds(range_nm: (f64, f64), nm: f64) -> bool {
    (range_nm.0..=range_nm.1).contains(&nm)
}

/// The spread of the uniaxial crystal `key`'s sources at `wavelength`; `None` when fewer than two
/// of its sources hold the wavelength.
pub fn uniaxial_spread(key: &str, wavelength: Wavelength) -> Option<Spread> {
    let mut names = Vec::new();
    let mut rows = Vec::new();
    for m in super::uniaxial_sources(key) {
        if !holds(m.range_nm, wavelength.nm()) {
            continue;
        }
        let formulas = [("ordinary", &m.ordinary), ("extraordinary", &m.extraordinary)];
        if let Ok((values, _)) = principal_values(m.name, m.range_nm, formulas, Quantity::Phase, wavelength) {
            names.push(m.source);
            rows.push(values.to_vec());
        }
    }
    spread_of(names, &rows)
}

/// The spread of the biaxial crystal `key`'s sources at `wavelength`; `None` when fewer than two
/// of its sources hold the wavelength.
pub fn biaxial_spread(key: &str, wavelength: Wavelength) -> Option<Spread> {
    let mut names = Vec::new();
    let mut rows = Vec::new();
    for m in super::biaxial_sources(key) {
        if !holds(m.range_nm, wavelength.nm()) {
            continue;
        }
        if let Ok(p) = m.principal(wavelength) {
            names.push(m.source);
            rows.push(p.principal.to_vec());
        }
    }
    spread_of(names, &rows)
}

/// The spread of catalogue crystal `key` (uniaxial or biaxial) at `wavelength`.
pub fn spread(key: &str, wavelength: Wavelength) -> Option<Spread> {
    uniaxial_spread(key, wavelength).or_else(|| biaxial_spread(key, wavelength))
}

/// One source as the materials listing shows it: `{key, citation, range_nm, fitted_in,
/// verified, default}`.
fn listed(
    source: &str,
    citation: &str,
    range_nm: (f64, f64),
    fitted_in: FittedIn,
    verified: bool,
    default: bool,
) -> serde_json::Value {
    serde_json::json!({
        "key": source, "citation": citation, "range_nm": [range_nm.0, range_nm.1],
        "fitted_in": fitted_in.as_str(), "verified": verified, "default": default,
    })
}

/// Every source of catalogue crystal `key`, default first, as the materials listing shows them.
pub fn describe_sources(key: &str) -> Vec<serde_json::Value> {
    let uniaxial = super::uniaxial_sources(key)
        .into_iter()
        .enumerate()
        .map(|(i, m)| listed(m.source, m.citation, m.range_nm, m.fitted_in, m.verified, i == 0));
    let biaxial = super::biaxial_sources(key)
        .into_iter()
        .enumerate()
        .map(|(i, m): (usize, &BiaxialMaterial)| listed(m.source, m.citation, m.range_nm, m.fitted_in, true, i == 0));
    uniaxial.chain(biaxial).collect()
}

/// The uniaxial source `source` of crystal `key` (both compared without regard to ASCII case).
pub fn find_uniaxial_source(key: &str, source: &str) -> Option<&'static Material> {
    super::uniaxial_sources(key)
        .into_iter()
        .find(|m| m.source.eq_ignore_ascii_case(source))
}

/// The biaxial source `source` of crystal `key` (both compared without regard to ASCII case).
pub fn find_biaxial_source(key: &str, source: &str) -> Option<&'static BiaxialMaterial> {
    super::biaxial_sources(key)
        .into_iter()
        .find(|m| m.source.eq_ignore_ascii_case(source))
}

/// The source keys of catalogue crystal `key`, default first (empty for an unknown key).
pub fn source_keys(key: &str) -> Vec<&'static str> {
    let mut keys: Vec<&'static str> = super::uniaxial_sources(key).iter().map(|m| m.source).collect();
    keys.extend(super::biaxial_sources(key).iter().map(|m| m.source));
    keys
}

#[cfg(test)]
mod tests {
    use super::super::{all_keys, biaxial_catalogue, catalogue, uniaxial_sources};
    use super::*;

    fn wl(nm: f64) -> Wavelength {
        Wavelength::from_nm(nm).expect("positive")
    }

    #[test]
    fn every_source_belongs_to_its_crystal_and_keys_are_unique() {
        for key in all_keys() {
            let keys = source_keys(key);
            assert!(!keys.is_empty(), "{key} has a source");
            let mut sorted = keys.clone();
            sorted.sort_unstable();
            sorted.dedup();
            assert_eq!(sorted.len(), keys.len(), "{key}: source keys are unique");
        }
        for m in catalogue() {
            assert_eq!(uniaxial_sources(m.key)[0], m, "the catalogue entry is the default");
            for s in uniaxial_sources(m.key) {
                assert_eq!((s.key, s.name, s.sign), (m.key, m.name, m.sign));
                assert!(s.range_nm.0 < s.range_nm.1 && s.range_nm.0 > 0.0);
                // The sign holds over the source's own range (checked at 50 points).
                for i in 0..=50 {
                    let nm = s.range_nm.0 + (s.range_nm.1 - s.range_nm.0) * f64::from(i) / 50.0;
                    let ix = s.indices(wl(nm)).expect("inside its range").indices;
                    assert_eq!(ix.sign(), Some(s.sign), "{} {} at {nm} nm", s.key, s.source);
                }
            }
        }
        for m in biaxial_catalogue() {
            for s in super::super::biaxial_sources(m.key) {
                assert_eq!((s.key, s.name), (m.key, m.name));
                for i in 0..=50 {
                    let nm = s.range_nm.0 + (s.range_nm.1 - s.range_nm.0) * f64::from(i) / 50.0;
                    let [x, y, z] = s.principal(wl(nm)).expect("inside its range").principal;
                    assert!(
                        x < y && y < z,
                        "{} {} at {nm} nm keeps n_x < n_y < n_z",
                        s.key,
                        s.source
                    );
                }
            }
        }
    }

    #[test]
    fn the_spread_is_the_difference_of_the_sources_compared() {
        // Two calcite sources at 589.3 nm: the spread is their plain difference, computed here
        // from each source's own indices.
        let w = wl(589.3);
        let a = find_uniaxial_source("calcite", "ghosh-1999")
            .unwrap()
            .indices(w)
            .unwrap()
            .indices;
        let b = find_uniaxial_source("calcite", "TROPF-1995")
            .unwrap()
            .indices(w)
            .unwrap()
            .indices;
        let s = spread("calcite", w).expect("two sources hold 589.3 nm");
        assert_eq!(s.sources, ["ghosh-1999", "tropf-1995"]);
        assert_eq!(s.principal, vec![(a.no - b.no).abs(), (a.ne - b.ne).abs()]);
        assert_eq!(s.birefringence, ((a.ne - a.no) - (b.ne - b.no)).abs());
        // Biaxial: n_z − n_x is the birefringence.
        let s = spread("lbo", wl(1064.0)).expect("two LBO sources");
        assert_eq!(s.principal.len(), 3);
        // Beyond the default's range (2172 nm) only one calcite source holds: no spread.
        assert_eq!(spread("calcite", wl(2190.0)), None);
        // One source only, or not a catalogue key: no spread.
        assert_eq!(spread("rutile", wl(633.0)), None);
        assert_eq!(spread("unobtainium", wl(633.0)), None);
        assert_eq!(find_uniaxial_source("calcite", "kato-2002"), None);
    }

    #[test]
    fn other_sources_agree_with_published_values_to_their_known_disagreement() {
        // Calcite at 589.3 nm: n_o = 1.6584, n_e = 1.4864, the handbook values (common practice,
        // from memory); both sources within 4e-4 of them.
        for source in ["ghosh-1999", "tropf-1995"] {
            let ix = find_uniaxial_source("calcite", source)
                .unwrap()
                .indices(wl(589.3))
                .unwrap()
                .indices;
            assert!(
                (ix.no - 1.6584).abs() < 4e-4 && (ix.ne - 1.4864).abs() < 4e-4,
                "{source}: {ix:?}"
            );
        }
        // Independent fits of one crystal agree to about 1e-3 in the visible and near infrared
        // (common practice for well-measured crystals); checked every 10 nm over the overlap of
        // their ranges within 400-2000 nm. Toward the ultraviolet edge they part further
        // (calcite: 2.7e-3 in n_o at 204 nm), which the spread reports.
        for (key, other, bound) in [
            ("calcite", "tropf-1995", 1.5e-3),
            ("linbo3", "edwards-1984", 1.5e-3),
            ("yvo4", "data-sheet", 2e-3),
        ] {
            let a = find_uniaxial_source(key, source_keys(key)[0]).unwrap();
            let b = find_uniaxial_source(key, other).unwrap();
            let (lo, hi) = (
                a.range_nm.0.max(b.range_nm.0).max(400.0),
                a.range_nm.1.min(b.range_nm.1).min(2000.0),
            );
            let mut nm = lo;
            while nm <= hi {
                let s = spread(key, wl(nm)).unwrap();
                assert!(s.principal.iter().all(|d| *d < bound), "{key} at {nm} nm: {s:?}");
                nm += 10.0;
            }
        }
        let s = spread("lbo", wl(1064.0)).unwrap();
        assert!(s.principal.iter().all(|d| *d < 3e-4), "LBO sources at 1064 nm: {s:?}");
    }

    #[test]
    fn the_listing_names_the_default_and_the_fitted_wavelength() {
        let list = describe_sources("calcite");
        assert_eq!(list.len(), 2);
        assert_eq!(list[0]["default"], true);
        assert_eq!(list[1]["key"], "tropf-1995");
        assert_eq!(list[1]["fitted_in"], "not stated");
        assert!(describe_sources("unobtainium").is_empty());
        assert_eq!(FittedIn::Air.as_str(), "air");
        assert_eq!(FittedIn::Vacuum.as_str(), "vacuum");
    }
}

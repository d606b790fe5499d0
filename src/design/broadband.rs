//! Broadband retarders: N plates whose stack holds a target retardance, with a steady fast axis
//! and no rotation, over a band, found by a global search.
//!
//! Physics. At normal incidence with ideal faces each plate is a linear retarder of retardance
//! Γ(λ) = 2π·w(λ)·d (w the crystal's birefringence in waves per millimetre at λ and the design
//! temperature, thermal growth included) about its optic axis, which lies in the faces at the
//! plate's azimuth; the stack's Jones matrix U(λ) is the product of the plates'. Any lossless
//! Jones matrix, its global phase removed, is a linear retarder between two equal rotations,
//! U = e^{iα}·Rot(ω/2)·L(δ, θ)·Rot(ω/2) (the equivalence theorem of H. Hurwitz and R. C. Jones,
//! JOSA 31, 493 (1941), from memory; the symmetric split is chosen here so that the axis θ is
//! well defined at a half wave, where the rotation ω is not). The answer reports δ (0 to ½
//! wave), θ and ω across the band. A palindromic stack has ω = 0.
//!
//! Method. The search minimizes the mean over 41 wavelengths of the band of 1 − |tr(T†U)|/2,
//! the distance (to a global phase) of the stack from the target retarder T of the requested
//! retardance and fast axis; it is 0 only for the exact target. Unknowns: each plate's thickness
//! (0 to twice a full-wave plate of its crystal at the band's centre, or `max_thickness_mm`) and
//! azimuth (0 to 180°). The minimizer is differential evolution ([`crate::design::evolution`]),
//! deterministic for the seed, started from a single zero-order plate of the first crystal (the
//! other plates of no thickness), so the answer is never worse than that plate. For a half-wave
//! target with three plates of one crystal, the classic design of S. Pancharatnam (Proc. Indian
//! Acad. Sci. A 41, 137 (1955), from memory: three equal half-wave plates, the outer two
//! parallel, the middle one at 60° to them) is placed in the first population and reported
//! beside the result as the reference it must match or beat. With more plates, or two crystals,
//! the classic is placed on the first three plates of one crystal (the others of no thickness,
//! the same Jones product), so that more plates never answer worse than the classic they contain.
//! For a half wave of two or more plates a first search sets only the azimuths of equal
//! half-wave plates (each a half wave of its own crystal at the centre; the family the classic
//! belongs to, with half the unknowns, so it settles within the budget), and its best is a start
//! of the full search. The full search's best is finished by the Nelder–Mead simplex
//! ([`crate::design::simplex`]), which takes it to the floor of its valley. One plate more never
//! answers worse: the N-plate search first solves N − 1 plates the same way (so that answer is
//! the one a request for N − 1 plates gets) and also finishes by the simplex that answer with a
//! plate added that changes nothing (one of no thickness inserted, or one plate split in two at
//! its azimuth), keeping the best; the cost is one search per plate count up to N. The distance
//! is computed on the unitary part of each plate's Jones matrix (two complex numbers), the same
//! number as the full product's with half the multiplications. Measured here (quartz, half
//! wave, 450–800 nm, 1000 generations): three plates ±0.025 waves, four ±0.011, five ±0.004,
//! six ±0.004 (distances 2.1e-3, 1.1e-4, 1.8e-5, 1.8e-5); before one plate more started from
//! the answer of one fewer, five plates stayed at four plates' distance (±0.011), and without
//! the first search and the simplex, four plates stayed at ±0.032 and five at ±0.044, in the
//! valley of the classic they contain. The distance falls with N; the largest retardance error,
//! which the search does not minimize, need not (six plates can end a few thousandths above five).
//!
//! Biaxial crystals: a plate cut along a principal axis (its own `cut`,
//! [`crate::design::principal`], chosen at the band's centre) is the same linear retarder with
//! Γ = 2π (n_slow − n_fast) L / λ and its slower in-face principal axis at the plate's azimuth,
//! where a uniaxial plate has its optic axis; its slow and fast axes are kept over the band (the
//! model assumes its birefringence keeps one sign there, as the catalogue's biaxial crystals'
//! does; [`crate::design::waveplate`]'s achromat assumes the same).
//!
//! Conventions: azimuths from x toward y, degrees; the fast axis of the equivalent retarder is
//! the one whose light leads by δ.

use super::evolution::{Minimum, minimize};
use super::part::{Part, oriented_crystal};
use super::principal::{BiaxialCut, CutReport};
use super::simplex::polish;
use super::waveplate::{Plate, PlateCut, cut_of, stack_retardance_at};
use crate::contract::request::BroadbandRequest;
use crate::contract::scenario::Medium;
use crate::error::Error;
use crate::optics::wavelength::Wavelength;
use num_complex::Complex64;
use serde::Serialize;
use std::f64::consts::TAU;

/// Wavelengths at which the search weighs the stack.
const SEARCH_POINTS: usize = 41;
/// Points of the reported curves.
const CURVE_POINTS: usize = 81;
/// Evaluations the simplex may spend finishing the global search's best stack.
const POLISH_EVALUATIONS: usize = 20_000;
/// Gap between plates in the answer's scenario, mm (plates in air, as a stack is mounted).
const GAP_MM: f64 = 0.0;

type M2 = [[Complex64; 2]; 2];

fn mul(a: &M2, b: &M2) -> M2 {
    let mut c = [[Complex64::new(0.0, 0.0); 2]; 2];
    for (i, row) in c.iter_mut().enumerate() {
        for (j, v) in row.iter_mut().enumerate() {
            *v = a[i][0] * b[0][j] + a[i][1] * b[1][j];
        }
    }
    c
}

/// The linear retarder whose axis at `axis_rad` gets the phase `gamma` relative to the other.
fn plate(gamma: f64, axis_rad: f64) -> M2 {
    let (s, c) = axis_rad.sin_cos();
    let e = Complex64::from_polar(1.0, gamma) - 1.0;
    let one = Complex64::new(1.0, 0.0);
    // R diag(e^{iΓ}, 1) Rᵀ = I + (e^{iΓ} − 1)·a aᵀ, a = (cos, sin).
    [[one + e * c * c, e * c * s], [e * c * s, one + e * s * s]]
}

/// The unitary part (α, β) of a retarder whose axis at angle φ takes the phase `gamma`, given
/// (sin 2φ, cos 2φ): α = cos(Γ/2) + i·sin(Γ/2)·cos 2φ, β = i·sin(Γ/2)·sin 2φ.
fn unitary(gamma: f64, (sin2, cos2): (f64, f64)) -> (Complex64, Complex64) {
    let (s, c) = (0.5 * gamma).sin_cos();
    (Complex64::new(c, s * cos2), Complex64::new(0.0, s * sin2))
}

/// The equivalent retarder of a lossless Jones matrix: (δ in rad, 0 to π; fast axis θ in rad;
/// rotation ω in rad), with U = e^{iα} Rot(ω/2) L(δ, θ) Rot(ω/2), L's fast axis at θ.
pub fn equivalent(u: &M2) -> (f64, f64, f64) {
    let det = u[0][0] * u[1][1] - u[0][1] * u[1][0];
    let k = det.sqrt();
    let (mut a, mut b) = (u[0][0] / k, u[0][1] / k);
    if a.re < 0.0 {
        a = -a;
        b = -b;
    }
    // a = cos ω cos δ/2 − i sin δ/2 cos(2θ), b = −sin ω cos δ/2 − i sin δ/2 sin(2θ), with θ the
    // symmetric split's axis (the rotation's half on either side).
    let cos_half = a.re.hypot(b.re);
    let sin_half = a.im.hypot(b.im);
    let delta = 2.0 * sin_half.atan2(cos_half);
    let omega = (-b.re).atan2(a.re);
    let axis = 0.5 * (-b.im).atan2(-a.im);
    (delta, axis, omega)
}

/// One point of the reported curves.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct BandPoint {
    /// Wavelength, nm.
    pub wavelength_nm: f64,
    /// Retardance of the equivalent retarder, waves (0 to ½).
    pub retardance_waves: f64,
    /// Its fast axis, degrees from x (within 90° of the target's).
    pub fast_axis_deg: f64,
    /// Its rotation, degrees; `null` for a half-wave target, where a rotation and a turn of the
    /// axis are the same thing and only the axis is reported.
    pub rotation_deg: Option<f64>,
}

/// The worst departures from the target over the band.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Departures {
    /// Largest |δ − δ₀|, waves.
    pub retardance_waves: f64,
    /// Largest |θ − θ₀|, degrees.
    pub fast_axis_deg: f64,
    /// Largest |ω|, degrees; `null` for a half-wave target (see [`BandPoint::rotation_deg`]).
    pub rotation_deg: Option<f64>,
    /// The search's objective: mean of 1 − |tr(T†U)|/2 over the band.
    pub distance: f64,
}

/// One plate of the answer.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BroadbandPlate {
    /// Catalogue key ("custom" for a crystal given by indices).
    pub material: String,
    /// Thickness at 20 °C, mm.
    pub thickness_mm: f64,
    /// Optic-axis azimuth, degrees from x (the axis lies in the faces); for a biaxial plate, the
    /// azimuth of its slower in-face principal axis.
    pub axis_azimuth_deg: f64,
    /// Retardance at the band's centre, waves.
    pub retardance_waves: f64,
    /// For a biaxial plate, its cut (`cut`, `cut_note`, `principal_indices` at the band's centre
    /// and the design temperature), as a waveplate reports its one cut; left out otherwise.
    #[serde(flatten)]
    pub biaxial: Option<CutReport>,
}

/// A stack compared with the result (the published classic, a single plate).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Reference {
    /// What it is.
    pub name: String,
    /// Its plates.
    pub plates: Vec<BroadbandPlate>,
    /// Its departures over the band.
    pub departures: Departures,
}

/// How the search ran.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Search {
    /// The method.
    pub method: &'static str,
    /// Population size.
    pub population: usize,
    /// Generations run.
    pub generations: usize,
    /// The seed.
    pub seed: u64,
}

/// A solved broadband retarder.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BroadbandDesign {
    /// Target retardance, waves.
    pub target_retardance_waves: f64,
    /// Target fast axis, degrees.
    pub target_fast_axis_deg: f64,
    /// The band, nm.
    pub band_nm: [f64; 2],
    /// The plates in order.
    pub plates: Vec<BroadbandPlate>,
    /// The worst departures over the band.
    pub departures: Departures,
    /// Retardance, fast axis and rotation across the band.
    pub curve: Vec<BandPoint>,
    /// The published classic design (three-plate half-wave of one crystal), when it applies
    /// (left out otherwise).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub classic: Option<Reference>,
    /// A single zero-order plate of the first crystal, for comparison.
    pub single_plate: Reference,
    /// How the search ran.
    pub search: Search,
    /// What the solver left out or assumed (a plate that came out of no thickness).
    pub notes: Vec<String>,
    /// The stack, ready to load: the plates in order, those of no thickness left out (a scenario
    /// has no crystal of no thickness; such a plate changes nothing).
    pub scenario: Part,
}

/// The model of one request: each plate's birefringence across the band.
struct Model<'a> {
    req: &'a BroadbandRequest,
    /// Each plate's cut (a uniaxial plate's axis in its faces, a biaxial plate's principal cut)
    /// and what an answer reports of a biaxial one.
    cuts: Vec<(PlateCut, Option<CutReport>)>,
    /// Waves per millimetre of each plate's crystal at each search wavelength.
    search_w: Vec<Vec<f64>>,
    /// Waves per millimetre of each plate's crystal at the band's centre.
    centre_w: Vec<f64>,
}

/// Waves per millimetre of `m` cut as `cut` at `nm`, `t_c` (signed: positive when the axis at
/// the plate's azimuth, a uniaxial plate's optic axis or a biaxial plate's slower in-face axis,
/// is slow).
fn waves_per_mm(m: &Medium, cut: PlateCut, nm: f64, t_c: f64) -> Option<f64> {
    stack_retardance_at(&[Plate::new(*m, 1.0, 0.0, cut)], nm, [0.0, 0.0], t_c).map(|g| g / TAU)
}

fn grid(lo: f64, hi: f64, n: usize) -> Vec<f64> {
    (0..n).map(|i| lo + (hi - lo) * i as f64 / (n - 1) as f64).collect()
}

impl Model<'_> {
    fn stack(&self, w: &[f64], plates: &[(f64, f64)]) -> M2 {
        let mut u = plate(0.0, 0.0);
        for ((t, az), w) in plates.iter().zip(w) {
            u = mul(&plate(TAU * w * t, az.to_radians()), &u);
        }
        u
    }

    #[cfg(test)]
    fn target(&self) -> M2 {
        // The fast axis leads: the slow axis (fast + 90°) takes the phase δ.
        plate(
            TAU * self.req.retardance_waves,
            (self.req.fast_axis_deg + 90.0).to_radians(),
        )
    }

    /// Mean distance of the stack from the target over `ws` (waves per mm per wavelength).
    ///
    /// Formula: with its global phase e^{iΓ/2} taken out, a plate is the unitary
    /// [[α, β], [−β̄, ᾱ]], α = cos(Γ/2) + i·sin(Γ/2)·cos 2φ, β = i·sin(Γ/2)·sin 2φ (φ the axis that
    /// takes Γ); products keep that form (α = α₁α₂ − β₁β̄₂, β = α₁β₂ + β₁ᾱ₂), and
    /// |tr(T†U)|/2 = |Re(ᾱ_T α_U + β̄_T β_U)|. The same number as the Jones product's trace
    /// (checked in the tests), with half the multiplications and the azimuths' sines taken once
    /// per stack instead of once per wavelength.
    fn distance(&self, ws: &[Vec<f64>], plates: &[(f64, f64)]) -> f64 {
        let axes: Vec<(f64, f64)> = plates
            .iter()
            .map(|&(_, az)| (2.0 * az.to_radians()).sin_cos())
            .collect();
        let (ta, tb) = unitary(
            TAU * self.req.retardance_waves,
            (2.0 * (self.req.fast_axis_deg + 90.0).to_radians()).sin_cos(),
        );
        let sum: f64 = ws
            .iter()
            .map(|w| {
                let mut a = Complex64::new(1.0, 0.0);
                let mut b = Complex64::new(0.0, 0.0);
                for ((&(t, _), &axis), w) in plates.iter().zip(&axes).zip(w) {
                    let (pa, pb) = unitary(TAU * w * t, axis);
                    (a, b) = (pa * a - pb * b.conj(), pa * b + pb * a.conj());
                }
                1.0 - (ta.conj() * a + tb.conj() * b).re.abs()
            })
            .sum();
        sum / ws.len() as f64
    }

    /// The equivalent retarder's point at `nm`.
    fn point(&self, nm: f64, plates: &[(f64, f64)]) -> Option<BandPoint> {
        let w: Vec<f64> = self
            .req
            .media
            .iter()
            .zip(&self.cuts)
            .map(|(m, (cut, _))| waves_per_mm(&m.medium, *cut, nm, self.req.temperature_c))
            .collect::<Option<_>>()?;
        let (delta, axis, omega) = equivalent(&self.stack(&w, plates));
        // Within 90° of the target's axis (a retarder's axis is a line).
        let target = self.req.fast_axis_deg;
        let mut deg = axis.to_degrees();
        while deg - target > 90.0 {
            deg -= 180.0;
        }
        while target - deg > 90.0 {
            deg += 180.0;
        }
        Some(BandPoint {
            wavelength_nm: nm,
            retardance_waves: delta / TAU,
            fast_axis_deg: deg,
            rotation_deg: ((self.req.retardance_waves - 0.5).abs() >= 1e-12).then(|| omega.to_degrees()),
        })
    }

    /// The worst departures of `plates` over the band and their curve.
    fn judge(&self, plates: &[(f64, f64)]) -> Result<(Departures, Vec<BandPoint>), Error> {
        let (lo, hi) = self.req.band_nm;
        let curve: Vec<BandPoint> = grid(lo, hi, CURVE_POINTS)
            .into_iter()
            .map(|nm| {
                self.point(nm, plates)
                    .ok_or_else(|| Error::new("band_nm", format!("a crystal's formula fails at {nm} nm")))
            })
            .collect::<Result<_, _>>()?;
        // Half-wave: the axis and the rotation trade off (a rotator and a half-wave plate are a
        // half-wave plate), so only the axis is judged there.
        let half = (self.req.retardance_waves - 0.5).abs() < 1e-12;
        let fold = |d: f64| {
            if half {
                ((d + 45.0).rem_euclid(90.0) - 45.0).abs()
            } else {
                d.abs()
            }
        };
        let dep = Departures {
            retardance_waves: curve
                .iter()
                .map(|p| (p.retardance_waves - self.req.retardance_waves).abs())
                .fold(0.0, f64::max),
            fast_axis_deg: curve
                .iter()
                .map(|p| fold(p.fast_axis_deg - self.req.fast_axis_deg))
                .fold(0.0, f64::max),
            rotation_deg: (!half).then(|| {
                curve
                    .iter()
                    .filter_map(|p| p.rotation_deg)
                    .map(f64::abs)
                    .fold(0.0, f64::max)
            }),
            distance: self.distance(&self.search_w, plates),
        };
        Ok((dep, curve))
    }

    /// The box of the first `k` plates' unknowns: thickness, azimuth for each.
    fn bounds(&self, k: usize) -> Vec<(f64, f64)> {
        self.centre_w[..k]
            .iter()
            .flat_map(|w| [(0.0, self.req.max_thickness_mm.unwrap_or(2.0 / w.abs())), (0.0, 180.0)])
            .collect()
    }

    /// Whether the target is a half wave.
    fn half(&self) -> bool {
        (self.req.retardance_waves - 0.5).abs() < 1e-12
    }

    /// The single zero-order plate of the first crystal that makes the target at the centre.
    fn single_plate(&self) -> (f64, f64) {
        let w0 = self.centre_w[0];
        let axis = if w0 > 0.0 {
            self.req.fast_axis_deg + 90.0
        } else {
            self.req.fast_axis_deg
        };
        (self.req.retardance_waves / w0.abs(), axis.rem_euclid(180.0))
    }

    /// The classic three-plate half-wave (one crystal): half-wave plates at φ + 60°, φ + 120°,
    /// φ + 60°, whose product is a half-wave plate at φ (mod 90°) at the centre; for `k` = 3
    /// plates of one crystal and a half wave only.
    fn classic(&self, k: usize) -> Option<Vec<(f64, f64)>> {
        let media = &self.req.media[..k];
        (self.half() && k == 3 && media.iter().all(|m| *m == media[0])).then(|| {
            let t = 0.5 / self.centre_w[0].abs();
            let f = self.req.fast_axis_deg;
            vec![
                (t, (f + 60.0).rem_euclid(180.0)),
                (t, (f + 120.0).rem_euclid(180.0)),
                (t, (f + 60.0).rem_euclid(180.0)),
            ]
        })
    }

    /// Good starting stacks of the first `k` plates, known before the search: the classic (or,
    /// with more plates or two crystals, the classic on the first three plates of one crystal,
    /// the others of no thickness, the same Jones product), the best equal half-wave plates
    /// (for a half wave: each a half wave of its own crystal at the centre, only their azimuths
    /// searched: half the unknowns, so that search settles within the budget), and the single
    /// zero-order plate of the first crystal (the others of no thickness).
    fn starts(&self, k: usize) -> Vec<Vec<(f64, f64)>> {
        let media = &self.req.media[..k];
        let f = self.req.fast_axis_deg;
        let padded_classic = (self.half() && k != 3)
            .then(|| {
                let group: Vec<usize> = media.iter().enumerate().find_map(|(i, m)| {
                    let same: Vec<usize> = (i..k).filter(|&j| media[j] == *m).take(3).collect();
                    (same.len() == 3).then_some(same)
                })?;
                let t = 0.5 / self.centre_w[group[0]].abs();
                let mut plates = vec![(0.0, 0.0); k];
                for (n, &i) in group.iter().enumerate() {
                    plates[i] = (t, (f + if n == 1 { 120.0 } else { 60.0 }).rem_euclid(180.0));
                }
                Some(plates)
            })
            .flatten();
        let equal_halves = (self.half() && k > 1).then(|| {
            let halves: Vec<f64> = self.centre_w[..k].iter().map(|w| 0.5 / w.abs()).collect();
            let with = |az: &[f64]| -> Vec<(f64, f64)> { halves.iter().zip(az).map(|(&t, &a)| (t, a)).collect() };
            let found = minimize(
                |az| self.distance(&self.search_w, &with(az)),
                &vec![(0.0, 180.0); k],
                &[],
                self.req.generations,
                self.req.seed,
            );
            with(&found.x)
        });
        let single: Vec<(f64, f64)> = std::iter::once(self.single_plate())
            .chain(std::iter::repeat_n((0.0, 0.0), k - 1))
            .collect();
        self.classic(k)
            .into_iter()
            .chain(padded_classic)
            .chain(equal_halves)
            .chain(std::iter::once(single))
            .collect()
    }

    /// The best stack of the first `k` plates the search finds, and how its global search ran.
    ///
    /// The global search starts from [`Model::starts`] and its best is finished by the simplex.
    /// For `k` > 1 the best stack of `k − 1` plates comes first (by the same search, so it is
    /// the answer a request for `k − 1` plates gets), and every way of adding a plate to it that
    /// changes nothing (a plate of no thickness inserted, or a plate split in two at its azimuth,
    /// wherever the crystals' order allows) is finished by the simplex too; the best of all is
    /// the answer. The simplex never climbs, so `k` plates' distance is never above `k − 1`
    /// plates'. Those stacks are not put in the global search's population: there they drew it
    /// into their valley (four quartz plates ended at three plates' answer, measured here).
    fn search(&self, k: usize) -> (Vec<(f64, f64)>, Minimum) {
        let bounds = self.bounds(k);
        let flat = |p: &[(f64, f64)]| -> Vec<f64> { p.iter().flat_map(|&(t, az)| [t, az]).collect() };
        let as_plates = |x: &[f64]| -> Vec<(f64, f64)> { x.chunks(2).map(|c| (c[0], c[1])).collect() };
        let objective = |x: &[f64]| self.distance(&self.search_w, &as_plates(x));
        let starts: Vec<Vec<f64>> = self.starts(k).iter().map(|p| flat(p)).collect();
        let found = minimize(objective, &bounds, &starts, self.req.generations, self.req.seed);
        // The global search finds the valley; the simplex goes down to its floor.
        let mut best = polish(objective, &bounds, &found.x, POLISH_EVALUATIONS);
        if k > 1 {
            let (fewer, _) = self.search(k - 1);
            let media = &self.req.media[..k];
            // Inserting at `p` shifts the plates after it by one: their crystals must agree.
            let shifts = |p: usize| (p + 1..k).all(|j| media[j] == media[j - 1]);
            for p in (0..k).rev().filter(|&p| shifts(p)) {
                let mut zero = fewer.clone();
                zero.insert(p, (0.0, 0.0));
                let mut grown = vec![zero];
                if p > 0 && media[p] == media[p - 1] {
                    let (t, az) = fewer[p - 1];
                    let mut split = fewer.clone();
                    split[p - 1] = (0.5 * t, az);
                    split.insert(p, (0.5 * t, az));
                    grown.push(split);
                }
                for g in grown {
                    let polished = polish(objective, &bounds, &flat(&g), POLISH_EVALUATIONS);
                    if polished.1 < best.1 {
                        best = polished;
                    }
                }
            }
        }
        (as_plates(&best.0), found)
    }

    fn plates_out(&self, plates: &[(f64, f64)]) -> Vec<BroadbandPlate> {
        plates
            .iter()
            .zip(&self.req.media)
            .zip(&self.centre_w)
            .zip(&self.cuts)
            .map(|(((&(t, az), m), w), (_, cut))| BroadbandPlate {
                material: m.medium.key().to_string(),
                thickness_mm: t,
                axis_azimuth_deg: az,
                retardance_waves: w * t,
                biaxial: cut.clone(),
            })
            .collect()
    }
}

/// Solves a broadband-retarder request.
///
/// # Errors
/// `band_nm` where a crystal's formula fails inside the band; `material` (or `materials[i]`) for
/// a crystal without birefringence at the band's centre; `cut` (or `materials[i].cut`) for a
/// biaxial cut whose two in-face indices are equal.
pub fn design(req: &BroadbandRequest) -> Result<BroadbandDesign, Error> {
    let (lo, hi) = req.band_nm;
    let centre = 0.5 * (lo + hi);
    let t_c = req.temperature_c;
    // A request of one crystal names it by `material` (its cut by `cut`); a list, by its entry
    // (`materials[i]`, `materials[i].cut`).
    let one = req.media.iter().all(|m| *m == req.media[0]);
    let entry = |i: usize| if one { String::new() } else { format!("materials[{i}]") };
    let material_field = |i: usize| if one { "material".to_string() } else { entry(i) };
    // Each plate's cut at the band's centre and the design temperature.
    let centre_wl = Wavelength::from_nm(centre)?;
    let cuts: Vec<(PlateCut, Option<CutReport>)> = req
        .media
        .iter()
        .enumerate()
        .map(|(i, m)| {
            let (biaxial, cut) = cut_of(&m.medium, m.cut, centre_wl, t_c).map_err(|e| match e.field.as_str() {
                "cut" => e.within(&entry(i)),
                _ => Error::new(material_field(i), e.message),
            })?;
            Ok::<_, Error>((cut, biaxial.as_ref().map(BiaxialCut::report)))
        })
        .collect::<Result<_, _>>()?;
    let centre_w: Vec<f64> = req
        .media
        .iter()
        .zip(&cuts)
        .enumerate()
        .map(|(i, (m, (cut, _)))| {
            waves_per_mm(&m.medium, *cut, centre, t_c)
                .filter(|w| w.abs() > 0.0)
                .ok_or_else(|| {
                    Error::new(
                        material_field(i),
                        "this crystal has no birefringence at the band's centre",
                    )
                })
        })
        .collect::<Result<_, _>>()?;
    let search_w: Vec<Vec<f64>> = grid(lo, hi, SEARCH_POINTS)
        .iter()
        .map(|&nm| {
            req.media
                .iter()
                .zip(&cuts)
                .map(|(m, (cut, _))| waves_per_mm(&m.medium, *cut, nm, t_c))
                .collect::<Option<Vec<f64>>>()
                .ok_or_else(|| Error::new("band_nm", format!("a crystal's formula fails at {nm} nm")))
        })
        .collect::<Result<_, _>>()?;
    let model = Model {
        req,
        cuts,
        search_w,
        centre_w,
    };
    let classic_plates = model.classic(req.media.len());
    let w0 = model.centre_w[0];
    let single = vec![model.single_plate()];
    let (
        plates,
        Minimum {
            generations,
            population,
            ..
        },
    ) = model.search(req.media.len());
    let (departures, curve) = model.judge(&plates)?;
    let classic = classic_plates
        .map(|p| {
            Ok::<_, Error>(Reference {
                name: "three equal half-wave plates, the middle at 60° to the outer two (Pancharatnam 1955)".into(),
                departures: model.judge(&p)?.0,
                plates: model.plates_out(&p),
            })
        })
        .transpose()?;
    let single_model = Model {
        req: &BroadbandRequest {
            media: vec![req.media[0]],
            ..req.clone()
        },
        cuts: vec![model.cuts[0].clone()],
        search_w: model.search_w.iter().map(|w| vec![w[0]]).collect(),
        centre_w: vec![w0],
    };
    let single_plate = Reference {
        name: "a single zero-order plate of the first crystal".into(),
        departures: single_model.judge(&single)?.0,
        plates: single_model.plates_out(&single),
    };
    // Each plate oriented by its cut: a uniaxial plate's optic axis, a biaxial plate's slower
    // in-face axis at its azimuth. The search may leave a plate of no thickness (its lower
    // bound): it changes nothing and a scenario cannot hold it, so the part leaves it out.
    let elements = plates
        .iter()
        .zip(&req.media)
        .zip(&model.cuts)
        .filter(|((p, _), _)| p.0 > 0.0)
        .map(|((&(t, az), m), (cut, _))| oriented_crystal(m.medium, t, cut.at(az), GAP_MM))
        .collect();
    let notes = plates
        .iter()
        .enumerate()
        .filter(|(_, p)| p.0 <= 0.0)
        .map(|(i, _)| {
            format!(
                "plate {} came out of no thickness: the stack is made of the other plates, and the scenario leaves it out",
                i + 1
            )
        })
        .collect();
    let mut scenario = Part::new(centre_wl, None, elements).at_temperature(t_c);
    scenario.scenario.beam.polarization = crate::contract::scenario::Polarization::Linear { azimuth_deg: 45.0 };
    Ok(BroadbandDesign {
        target_retardance_waves: req.retardance_waves,
        target_fast_axis_deg: req.fast_axis_deg,
        band_nm: [lo, hi],
        plates: model.plates_out(&plates),
        departures,
        curve,
        classic,
        single_plate,
        search: Search {
            method: "differential evolution (DE/rand/1/bin, Storn & Price 1997, with self-adapting F and CR, Brest et al. 2006)",
            population,
            generations,
            seed: req.seed,
        },
        notes,
        scenario,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::f64::consts::PI;

    #[test]
    fn the_equivalent_retarder_recovers_a_retarder_between_rotations() {
        let rot = |w: f64| {
            let (s, c) = w.sin_cos();
            let z = |v: f64| Complex64::new(v, 0.0);
            [[z(c), z(-s)], [z(s), z(c)]]
        };
        for (delta, axis, omega) in [(0.3, 0.2, 0.1), (1.5, -0.7, -0.4), (3.0, 1.2, 0.0), (PI, 0.4, 0.0)] {
            // Fast axis at `axis`: the slow one, axis + 90°, takes the phase δ.
            let l = plate(delta, axis + PI / 2.0);
            let u = mul(&rot(omega / 2.0), &mul(&l, &rot(omega / 2.0)));
            let u = u.map(|r| r.map(|v| v * Complex64::from_polar(1.0, 0.77)));
            let (d, a, o) = equivalent(&u);
            assert!((d - delta).abs() < 1e-12, "{d} {delta}");
            let da = (a - axis).rem_euclid(PI);
            assert!(da < 1e-12 || PI - da < 1e-12, "{a} {axis}");
            assert!((o - omega).abs() < 1e-12, "{o} {omega}");
        }
    }

    #[test]
    fn the_unitary_distance_equals_the_jones_product_s() {
        // Cross-method: the search's distance against the trace of T†U from the full 2 × 2 Jones
        // products, over stacks drawn at random (thicknesses of no size included).
        let req = |fast: f64, waves: f64| {
            crate::contract::request::read_ok(
                &format!(
                    r#"{{"material": "quartz", "retardance_waves": {waves}, "fast_axis_deg": {fast}, "band_nm": [450, 800]}}"#
                ),
                BroadbandRequest::from_json,
            )
        };
        let mut rng = crate::random::Rng::new(5);
        for (fast, waves) in [(0.0, 0.5), (17.0, 0.25), (-40.0, 0.1)] {
            let r = req(fast, waves);
            for n in 1..=6 {
                let ws: Vec<Vec<f64>> = (0..7)
                    .map(|_| (0..n).map(|_| 5.0 + 40.0 * rng.uniform()).collect())
                    .collect();
                let plates: Vec<(f64, f64)> = (0..n)
                    .map(|i| (if i == 2 { 0.0 } else { 0.2 * rng.uniform() }, 180.0 * rng.uniform()))
                    .collect();
                let model = Model {
                    req: &r,
                    cuts: vec![(PlateCut::Axis, None); n],
                    search_w: ws.clone(),
                    centre_w: ws[0].clone(),
                };
                let t = model.target();
                let jones: f64 = ws
                    .iter()
                    .map(|w| {
                        let u = model.stack(w, &plates);
                        let tr = t[0][0].conj() * u[0][0]
                            + t[1][0].conj() * u[1][0]
                            + t[0][1].conj() * u[0][1]
                            + t[1][1].conj() * u[1][1];
                        1.0 - 0.5 * tr.norm()
                    })
                    .sum::<f64>()
                    / ws.len() as f64;
                let got = model.distance(&ws, &plates);
                assert!((got - jones).abs() < 1e-14, "{n} plates: {got} against {jones}");
            }
        }
    }

    #[test]
    fn three_half_wave_plates_at_60_degrees_make_a_half_wave_plate() {
        // Pancharatnam's composite at its design wavelength: H(60°)H(120°)H(60°) = H(0°) up to
        // phase (half-wave plates act as reflections of the polarization about their axes: two
        // make a rotation by twice the angle between them, H(120°)H(60°) = Rot(120°), and a
        // reflection about 60° after it is the reflection about 0°).
        let h = |deg: f64| plate(PI, f64::to_radians(deg));
        let u = mul(&h(60.0), &mul(&h(120.0), &h(60.0)));
        let (d, a, o) = equivalent(&u);
        assert!((d - PI).abs() < 1e-12);
        let a = a.to_degrees().rem_euclid(90.0);
        assert!(a < 1e-9 || 90.0 - a < 1e-9, "{a}");
        assert!(o.abs() < 1e-9);
    }
}

//! The director profile θ(z), φ(z) of a nematic cell at a voltage, from the Oseen–Frank elastic
//! energy and the electric energy at constant voltage.
//!
//! Physics. With the director n = (cos θ cos φ, cos θ sin φ, sin θ) depending on z alone, the
//! free energy per area is (de Gennes & Prost, *The Physics of Liquid Crystals*, §3.1–3.2)
//!
//! ```text
//! G = ∫ ½ [A(θ) θ'² + B(θ) φ'²] dz − ½ ε0 V² / ∫ dz/ε_zz(θ),
//! A = K11 cos²θ + K33 sin²θ,  B = (K22 cos²θ + K33 sin²θ) cos²θ,  ε_zz = ε⊥ + Δε sin²θ.
//! ```
//!
//! The electric term is the field's energy at constant voltage: D_z is the same at every depth
//! (∇·D = 0), E_z = D_z/(ε0 ε_zz(θ)) is not, and V = ∫ E_z dz fixes D_z = ε0 V / ∫ dz/ε_zz; the
//! field does work on the source, hence the minus sign (Landau & Lifshitz, *Electrodynamics of
//! Continuous Media*, §10). Strong anchoring fixes θ = pretilt at both faces (the same sense at
//! both, as in a cell rubbed antiparallel), φ = rubbing azimuth at the entrance and rubbing +
//! twist at the exit.
//!
//! Method. G is discretized on N equal intervals (director values at the N + 1 nodes, the
//! coefficients and ε_zz at each interval's mid-tilt) and minimized over the interior nodes by
//! Newton's method on the exact gradient and Hessian. The elastic part and ε_zz's own curvature
//! give a banded Hessian; the constant-voltage coupling adds one dense rank-one term
//! −(ε0 V²/W³) u uᵀ (W = Σ h/ε_zz, u = ∂W/∂x), handled by the Sherman–Morrison formula on two
//! band solves. Where the Hessian is not positive definite (on the way from an untilted start
//! above threshold) a diagonal shift is added until it is (Levenberg–Marquardt), and a
//! backtracking line search on G keeps every step downhill, so the solve ends at a minimum, not
//! at the untilted saddle. The discretization error is O(h²) (see [`crate::precision::LC_SUBLAYERS`]).

use crate::optics::lc::banded::Banded;
use crate::optics::lc::nematic::{EPSILON0_PN_PER_V2, Nematic};
use crate::precision::{DIRECTOR_ITERATIONS, DIRECTOR_STEP_RAD};

/// A cell's geometry: what the substrates impose.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CellLayout {
    /// Thickness of the nematic layer, µm (positive).
    pub thickness_um: f64,
    /// Director azimuth at the entrance face (the rubbing direction), radians.
    pub rubbing_rad: f64,
    /// Azimuth gained from the entrance to the exit face, radians.
    pub twist_rad: f64,
    /// Tilt of the director from the face at both faces, radians.
    pub pretilt_rad: f64,
}

/// The director at the N + 1 nodes z_j = j d/N of a cell.
#[derive(Debug, Clone, PartialEq)]
pub struct Profile {
    /// Tilt θ from the substrate plane at each node, radians.
    pub tilt: Vec<f64>,
    /// Azimuth φ at each node, radians.
    pub azimuth: Vec<f64>,
}

impl Profile {
    /// The profile with no field: the pretilt everywhere and the twist growing linearly, the
    /// exact solution at zero voltage when pretilt or twist is zero.
    pub fn relaxed(cell: &CellLayout, sublayers: usize) -> Profile {
        let n = sublayers.max(1);
        Profile {
            tilt: vec![cell.pretilt_rad; n + 1],
            azimuth: (0..=n)
                .map(|j| cell.rubbing_rad + cell.twist_rad * j as f64 / n as f64)
                .collect(),
        }
    }

    /// Number of sublayers (intervals).
    pub fn sublayers(&self) -> usize {
        self.tilt.len() - 1
    }

    /// The tilt and azimuth in the middle of sublayer `j` (the mean of its two nodes), the
    /// uniform director the light sees there.
    pub fn mid(&self, j: usize) -> (f64, f64) {
        (
            0.5 * (self.tilt[j] + self.tilt[j + 1]),
            0.5 * (self.azimuth[j] + self.azimuth[j + 1]),
        )
    }

    /// Tilt at the cell's mid-plane (the middle node, or the mean of the two middle ones).
    pub fn mid_plane_tilt(&self) -> f64 {
        let n = self.sublayers();
        if n.is_multiple_of(2) {
            self.tilt[n / 2]
        } else {
            0.5 * (self.tilt[n / 2] + self.tilt[n / 2 + 1])
        }
    }

    /// Retardance at normal incidence, in waves, of a cell `thickness_um` thick at `wavelength_um`:
    /// (1/λ) ∫ (n_eff(θ(z)) − n_o) dz, summed over the sublayers at their mid-tilts.
    pub fn retardance_waves(&self, lc: &Nematic, thickness_um: f64, wavelength_um: f64) -> f64 {
        let n = self.sublayers();
        let h = thickness_um / n as f64;
        (0..n).map(|j| lc.n_eff(self.mid(j).0) - lc.no).sum::<f64>() * h / wavelength_um
    }
}

/// The energy terms of one interval and their derivatives in (t, a, b) = (mid-tilt, Δθ, Δφ).
struct Interval {
    /// Elastic energy (A a² + B b²)/(2h).
    energy: f64,
    /// Gradient in (t, a, b).
    grad: [f64; 3],
    /// Hessian in (t, a, b), row-major.
    hess: [[f64; 3]; 3],
}

fn interval(lc: &Nematic, h: f64, t: f64, a: f64, b: f64) -> Interval {
    let (k11, k22, k33) = (lc.k11_pn, lc.k22_pn, lc.k33_pn);
    let (s2, c2) = (2.0 * t).sin_cos();
    let cos_sq = 0.5 * (1.0 + c2);
    let aa = k11 + (k33 - k11) * 0.5 * (1.0 - c2);
    let aa1 = (k33 - k11) * s2;
    let aa2 = 2.0 * (k33 - k11) * c2;
    let bb = k22 * cos_sq * cos_sq + 0.25 * k33 * s2 * s2;
    let bb1 = -2.0 * k22 * cos_sq * s2 + 0.5 * k33 * (4.0 * t).sin();
    let bb2 = 2.0 * k22 * s2 * s2 - 4.0 * k22 * cos_sq * c2 + 2.0 * k33 * (4.0 * t).cos();
    let inv2h = 0.5 / h;
    Interval {
        energy: (aa * a * a + bb * b * b) * inv2h,
        grad: [(aa1 * a * a + bb1 * b * b) * inv2h, aa * a / h, bb * b / h],
        hess: [
            [(aa2 * a * a + bb2 * b * b) * inv2h, aa1 * a / h, bb1 * b / h],
            [aa1 * a / h, aa / h, 0.0],
            [bb1 * b / h, 0.0, bb / h],
        ],
    }
}

/// g(t) = h/ε_zz(t) and its first two derivatives.
fn inverse_eps(lc: &Nematic, h: f64, t: f64) -> [f64; 3] {
    let de = lc.delta_eps();
    let e = lc.eps_zz(t);
    let (s2, c2) = (2.0 * t).sin_cos();
    let e1 = de * s2;
    let e2 = 2.0 * de * c2;
    [
        h / e,
        -h * e1 / (e * e),
        h * (2.0 * e1 * e1 / (e * e * e) - e2 / (e * e)),
    ]
}

/// The problem at one voltage: the nematic, the node spacing and the voltage.
struct Problem<'a> {
    lc: &'a Nematic,
    h: f64,
    voltage: f64,
}

/// Everything Newton needs at one point.
struct Local {
    energy: f64,
    grad: Vec<f64>,
    /// The banded part of the Hessian.
    band: Banded,
    /// ∂W/∂x and the weight c of the rank-one part −c u uᵀ.
    u: Vec<f64>,
    c: f64,
}

/// Index of node i's tilt (its azimuth is the next one) among the unknowns.
fn slot(i: usize) -> usize {
    2 * (i - 1)
}

impl Problem<'_> {
    fn energy(&self, tilt: &[f64], azimuth: &[f64]) -> f64 {
        let n = tilt.len() - 1;
        let mut elastic = 0.0;
        let mut w = 0.0;
        for j in 0..n {
            let t = 0.5 * (tilt[j] + tilt[j + 1]);
            elastic += interval(self.lc, self.h, t, tilt[j + 1] - tilt[j], azimuth[j + 1] - azimuth[j]).energy;
            w += self.h / self.lc.eps_zz(t);
        }
        elastic - 0.5 * EPSILON0_PN_PER_V2 * self.voltage * self.voltage / w
    }

    fn local(&self, tilt: &[f64], azimuth: &[f64]) -> Local {
        let n = tilt.len() - 1;
        let unknowns = 2 * (n - 1);
        let mut grad = vec![0.0; unknowns];
        let mut band = Banded::zeros(unknowns);
        let mut u = vec![0.0; unknowns];
        let ge: Vec<[f64; 3]> = (0..n)
            .map(|j| inverse_eps(self.lc, self.h, 0.5 * (tilt[j] + tilt[j + 1])))
            .collect();
        let w: f64 = ge.iter().map(|g| g[0]).sum();
        let v2 = EPSILON0_PN_PER_V2 * self.voltage * self.voltage;
        // ∂G_el/∂t_j = ½ ε0 V² g'(t_j)/W²; its local curvature ½ ε0 V² g''(t_j)/W².
        let field = 0.5 * v2 / (w * w);
        let mut energy = -0.5 * v2 / w;
        for j in 0..n {
            let iv = interval(
                self.lc,
                self.h,
                0.5 * (tilt[j] + tilt[j + 1]),
                tilt[j + 1] - tilt[j],
                azimuth[j + 1] - azimuth[j],
            );
            energy += iv.energy;
            let mut g = iv.grad;
            g[0] += field * ge[j][1];
            let mut e = iv.hess;
            e[0][0] += field * ge[j][2];
            // d(t, a, b)/d(θ_j, θ_j+1, φ_j, φ_j+1).
            let cols = [[0.5, -1.0, 0.0], [0.5, 1.0, 0.0], [0.0, 0.0, -1.0], [0.0, 0.0, 1.0]];
            let nodes = [(j, 0), (j + 1, 0), (j, 1), (j + 1, 1)];
            let index = |k: usize| {
                let (node, var) = nodes[k];
                (node >= 1 && node < n).then(|| slot(node) + var)
            };
            for p in 0..4 {
                let Some(ip) = index(p) else { continue };
                grad[ip] += (0..3).map(|r| cols[p][r] * g[r]).sum::<f64>();
                if p < 2 {
                    u[ip] += 0.5 * ge[j][1];
                }
                for q in 0..=p {
                    let Some(iq) = index(q) else { continue };
                    let mut hpq = 0.0;
                    for r in 0..3 {
                        for s in 0..3 {
                            hpq += cols[p][r] * e[r][s] * cols[q][s];
                        }
                    }
                    band.add(ip, iq, hpq);
                }
            }
        }
        Local {
            energy,
            grad,
            band,
            u,
            c: v2 / (w * w * w),
        }
    }
}

/// The director profile at RMS voltage `voltage` (volts) on `sublayers` intervals, starting from
/// `start` (a neighbouring voltage's profile of the same cell and size) when given.
///
/// Never fails: a non-finite voltage is taken as zero, and if Newton has not settled after
/// `DIRECTOR_ITERATIONS` steps the lowest-energy profile found is returned.
pub fn solve(lc: &Nematic, cell: &CellLayout, voltage: f64, sublayers: usize, start: Option<&Profile>) -> Profile {
    let n = sublayers.max(2);
    let voltage = if voltage.is_finite() { voltage } else { 0.0 };
    let mut profile = match start {
        Some(p) if p.sublayers() == n => {
            // An untilted start sits on the saddle that the field destabilizes above threshold,
            // where the gradient vanishes: a bulge of 10⁻⁶ rad lets Newton leave it (and below
            // threshold Newton takes it back out in a step or two).
            let mut p = p.clone();
            for (j, t) in p.tilt.iter_mut().enumerate() {
                *t += 1e-6 * (std::f64::consts::PI * j as f64 / n as f64).sin();
            }
            p
        }
        _ => first_guess(lc, cell, voltage, n),
    };
    // Anchoring: the faces as the substrates impose them.
    profile.tilt[0] = cell.pretilt_rad;
    profile.tilt[n] = cell.pretilt_rad;
    profile.azimuth[0] = cell.rubbing_rad;
    profile.azimuth[n] = cell.rubbing_rad + cell.twist_rad;
    let problem = Problem {
        lc,
        h: cell.thickness_um / n as f64,
        voltage,
    };
    for _ in 0..DIRECTOR_ITERATIONS {
        let local = problem.local(&profile.tilt, &profile.azimuth);
        let Some((step, shifted)) = newton_step(&local) else {
            break;
        };
        let largest = step.iter().fold(0.0f64, |m, s| m.max(s.abs()));
        if !shifted && largest <= NEWTON_BASIN_RAD {
            // Near a minimum (positive definite Hessian, small step): plain Newton converges
            // quadratically, and the energy's change is below its rounding, so no line search.
            apply(&mut profile, &step, 1.0);
            if largest <= DIRECTOR_STEP_RAD {
                break;
            }
            continue;
        }
        let slope: f64 = local.grad.iter().zip(&step).map(|(g, s)| g * s).sum();
        let mut alpha = 1.0;
        let mut moved = false;
        for _ in 0..40 {
            let mut trial = profile.clone();
            apply(&mut trial, &step, alpha);
            let e = problem.energy(&trial.tilt, &trial.azimuth);
            if e <= local.energy + 1e-4 * alpha * slope {
                profile = trial;
                // A shifted step that gains less than the energy's rounding scale is a slide
                // along the flat valley where the director stands up (B(θ) → 0 at 90°, so the
                // azimuth there costs nothing): the tilt is settled to about 10⁻⁸ rad.
                moved = !shifted || local.energy - e > FLAT_VALLEY_ENERGY * (1.0 + local.energy.abs());
                break;
            }
            alpha *= 0.5;
        }
        if !moved {
            // Downhill is below the energy's rounding, or along the flat valley: settled.
            break;
        }
    }
    profile
}

/// A Newton step this small (radians) from a positive definite Hessian is taken whole: the
/// quadratic model is then good to (10⁻³)² and the energy's change near rounding.
const NEWTON_BASIN_RAD: f64 = 1e-3;

/// Relative energy gain below which a shifted (non-Newton) step ends the solve.
const FLAT_VALLEY_ENERGY: f64 = 1e-13;

/// x ← x + α·step over the interior nodes.
fn apply(profile: &mut Profile, step: &[f64], alpha: f64) {
    let n = profile.sublayers();
    for i in 1..n {
        profile.tilt[i] += alpha * step[slot(i)];
        profile.azimuth[i] += alpha * step[slot(i) + 1];
    }
}

/// The Newton step −H⁻¹∇G with H = band − c u uᵀ, shifted by μ I until H is positive definite;
/// `None` when not even a large shift makes it so (non-finite input). The flag says whether a
/// shift was needed.
fn newton_step(local: &Local) -> Option<(Vec<f64>, bool)> {
    let scale = (0..local.band.order())
        .fold(0.0f64, |m, i| m.max(local.band.diagonal(i).abs()))
        .max(1e-300);
    let mut mu = 0.0;
    for _ in 0..80 {
        let mut m = local.band.clone();
        m.shift(mu);
        if let Some(l) = m.cholesky() {
            let y = l.solve_factored(&local.grad);
            let z = l.solve_factored(&local.u);
            let uz: f64 = local.u.iter().zip(&z).map(|(a, b)| a * b).sum();
            let denom = 1.0 - local.c * uz;
            if denom > 1e-12 {
                let uy: f64 = local.u.iter().zip(&y).map(|(a, b)| a * b).sum();
                let k = local.c * uy / denom;
                let step: Vec<f64> = y.iter().zip(&z).map(|(a, b)| -(a + k * b)).collect();
                if step.iter().all(|s| s.is_finite()) {
                    return Some((step, mu > 0.0));
                }
            }
        }
        mu = if mu == 0.0 { 1e-8 * scale } else { mu * 4.0 };
    }
    None
}

/// A start that Newton takes to the tilted branch above threshold: a half-sine bulge toward
/// 90° whose height grows with V/V_th, over the linear twist.
fn first_guess(lc: &Nematic, cell: &CellLayout, voltage: f64, n: usize) -> Profile {
    let mut p = Profile::relaxed(cell, n);
    let vth = lc.threshold_v(cell.twist_rad);
    let ratio = if vth.is_finite() && vth > 0.0 {
        voltage / vth
    } else {
        0.0
    };
    let height = if ratio > 1.0 {
        (1.0 - 1.0 / ratio).min(0.95) * 1.4
    } else {
        0.01 * ratio.min(1.0)
    };
    for (j, t) in p.tilt.iter_mut().enumerate() {
        *t += height * (std::f64::consts::PI * j as f64 / n as f64).sin();
    }
    p
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::precision::{LC_SUBLAYERS, assert_close, assert_within};
    use std::f64::consts::{FRAC_PI_2, PI};

    /// 5CB from the catalogue at 633 nm.
    fn lc() -> Nematic {
        crate::optics::lc::catalogue::find("5cb").unwrap().at(0.633, 25.0)
    }

    fn cell(twist_deg: f64, pretilt_deg: f64) -> CellLayout {
        CellLayout {
            thickness_um: 5.0,
            rubbing_rad: 0.3,
            twist_rad: twist_deg.to_radians(),
            pretilt_rad: pretilt_deg.to_radians(),
        }
    }

    /// The assembled gradient is the energy's (central differences, a check of the algebra).
    #[test]
    fn gradient_is_the_energy_derivative() {
        let lc = lc();
        let c = cell(70.0, 3.0);
        let n = 12;
        let mut p = Profile::relaxed(&c, n);
        for j in 1..n {
            p.tilt[j] += 0.4 * (j as f64).sin();
            p.azimuth[j] += 0.2 * (j as f64 * 1.3).cos();
        }
        let problem = Problem {
            lc: &lc,
            h: c.thickness_um / n as f64,
            voltage: 2.5,
        };
        let local = problem.local(&p.tilt, &p.azimuth);
        assert_close(local.energy, problem.energy(&p.tilt, &p.azimuth), 1e-14, 1.0, "energy");
        let d = 1e-6;
        for i in 1..n {
            for var in 0..2 {
                let mut plus = p.clone();
                let mut minus = p.clone();
                let (vp, vm) = if var == 0 {
                    (&mut plus.tilt, &mut minus.tilt)
                } else {
                    (&mut plus.azimuth, &mut minus.azimuth)
                };
                vp[i] += d;
                vm[i] -= d;
                let fd = (problem.energy(&plus.tilt, &plus.azimuth) - problem.energy(&minus.tilt, &minus.azimuth))
                    / (2.0 * d);
                assert_close(local.grad[slot(i) + var], fd, 1e-6, 1.0, "gradient");
            }
        }
    }

    /// Below threshold without pretilt nothing moves: θ = 0 and φ grows linearly, the exact
    /// solution of the Euler–Lagrange equations (de Gennes & Prost §3.2).
    #[test]
    fn below_threshold_the_profile_is_uniform() {
        let lc = lc();
        let n = LC_SUBLAYERS;
        for twist in [0.0, 90.0] {
            let c = cell(twist, 0.0);
            let v = 0.9 * lc.threshold_v(c.twist_rad);
            let p = solve(&lc, &c, v, n, None);
            let relaxed = Profile::relaxed(&c, n);
            for j in 0..=n {
                assert_within(p.tilt[j], 0.0, 1e-10, "tilt below threshold");
                assert_within(p.azimuth[j], relaxed.azimuth[j], 1e-10, "linear twist");
            }
        }
        // At zero volts a pretilted untwisted cell keeps its pretilt everywhere.
        let c = cell(0.0, 2.0);
        let p = solve(&lc, &c, 0.0, 100, None);
        assert!(p.tilt.iter().all(|t| (t - 2f64.to_radians()).abs() < 1e-12));
    }

    /// The Freedericksz threshold found from the solved profiles (the lowest voltage at which the
    /// mid-plane tilt of a cell without pretilt rises above 10⁻³ rad, by bisection) is the
    /// closed form π √((K11 + (K33 − 2K22)(φ/π)²)/(ε0 Δε)) (Freedericksz & Zolina 1933; de Gennes &
    /// Prost §3.2) within 2·10⁻⁴: the O(h²) discretization (≈ 4·10⁻⁵) plus the voltage a tilt of
    /// 10⁻³ rad needs above threshold (≈ 10⁻⁶ relative).
    #[test]
    fn freedericksz_threshold_from_the_profile() {
        let lc = lc();
        for twist in [0.0, 90.0] {
            let c = cell(twist, 0.0);
            let expected = lc.threshold_v(c.twist_rad);
            let (mut lo, mut hi) = (0.8 * expected, 1.2 * expected);
            for _ in 0..30 {
                let mid = 0.5 * (lo + hi);
                if solve(&lc, &c, mid, 100, None).mid_plane_tilt() > 1e-3 {
                    hi = mid;
                } else {
                    lo = mid;
                }
            }
            assert_close(hi, expected, 2e-4, 1.0, "threshold from the profile");
        }
    }

    /// Far above threshold the mid-plane stands up: tilt → 90° (de Gennes & Prost §3.2), and it
    /// grows with voltage; warm starts give the same profile as cold ones (retardance to 10⁻⁸ waves, tilt to 10⁻⁴ rad: where
    /// the director stands up the twist costs almost nothing and the minimum is flat).
    #[test]
    fn high_voltage_stands_the_director_up() {
        let lc = lc();
        let c = cell(90.0, 2.0);
        let mut last = 0.0;
        let mut warm: Option<Profile> = None;
        for v in [0.5, 1.0, 1.5, 2.0, 3.0, 5.0, 10.0, 20.0, 50.0] {
            let p = solve(&lc, &c, v, 100, warm.as_ref());
            let cold = solve(&lc, &c, v, 100, None);
            for j in 0..=100 {
                assert_within(
                    p.tilt[j],
                    cold.tilt[j],
                    1e-4,
                    &format!("warm against cold start at {v} V, node {j}"),
                );
            }
            let (rw, rc) = (
                p.retardance_waves(&lc, 5.0, 0.633),
                cold.retardance_waves(&lc, 5.0, 0.633),
            );
            assert_within(rw, rc, 1e-8, &format!("retardance, warm against cold start at {v} V"));
            assert!(
                p.mid_plane_tilt() >= last - 1e-15,
                "{v} V: {} after {last}",
                p.mid_plane_tilt()
            );
            last = p.mid_plane_tilt();
            warm = Some(p);
        }
        assert!(
            last > FRAC_PI_2 - 0.01 && last <= FRAC_PI_2 + 1e-12,
            "mid-plane tilt at 50 V: {last}"
        );
        // With the tilt near 90° the twist gathers in the middle, where the director stands up.
        let p = warm.unwrap();
        assert_within(p.azimuth[50] - 0.3, PI / 4.0, 1e-6, "twist at the middle by symmetry");
    }
}

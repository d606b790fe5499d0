//! A liquid-crystal cell's slices crossed at several directions side by side: for each direction
//! H = M⁻¹ X, the inverse of the slices' transfer matrix M = P_N ⋯ P_1 (each P = exp(iθΔ) in
//! the closed form of [`crate::optics::lc::slice`]) applied to two columns X (the exit face's
//! two forward waves), with each number held as one f64 per direction, so that the compiler
//! turns the work of a slice into vector instructions. This is what a conoscopic figure of a cell
//! spends its time on.
//!
//! Physics. For a slice of real symmetric ε at real tangential wave vector, Berreman's Δ obeys
//! J Δ = Δᵀ J with Jψ = (ψ3, −ψ2, −ψ1, ψ0) (for ψ = (E_x, E_y, Z0H_x, Z0H_y); ψ†Jψ is twice the
//! Poynting flux along z; J = Jᵀ = J⁻¹). So A = JΔ is symmetric, and so is
//! S = J exp(iθΔ) = c0 J + c1 A + c2 A J A + c3 A J A J A (the powers' coefficients of the slice's
//! header): its ten entries need those of A, AJA and AJAJA (80 real products instead of Δ² and
//! Δ³'s 128). Since Δ is real, P⁻¹ = exp(−iθΔ) = J S̄ (the coefficients conjugated), and
//! M⁻¹ X = P_1⁻¹ ⋯ P_N⁻¹ X costs two columns a slice (32 complex products instead of the 64 of
//! the whole product). The interior transmission then follows from F a + B r = H t
//! ([`crate::optics::lc::stratified::solve_inverse`]), which is M (F a + B r) = F_out t
//! multiplied by M⁻¹. The coefficients are [`crate::optics::lc::slice`]'s (Newton's divided
//! differences of e^{iθλ} at the four q_z, ordered o₊, e₊, o₋, e₋), with the o wave's e^{iθ o₊}
//! solved once a direction (it is the same in every slice) and each slice's two half-angle sines
//! and cosines by their Taylor polynomials, exact to rounding for the arguments allowed.
//!
//! What is left to the slice-by-slice product ([`Slices::transfer`]). A direction is declined,
//! and the caller solves it slice by slice, when any slice would leave the closed form's plain
//! path there: an evanescent wave, waves within [`SLICE_ROOTS_APART`] of each other, a slice to
//! halve (θ·max|q_z| above [`SLICE_STEP_PHASE`]), an e wave at exactly the o wave's q_z, e₊ and o₋
//! so close that their difference needs a series, or a half phase between o and e waves above
//! [`HALF_GAP`]. The two agree to rounding (tested: 10⁻¹² of the columns' size; the
//! twisted-nematic example's figure at 256 × 256 to 10⁻¹⁵).
//!
//! Builds. Rust neither fuses a product with a sum nor reorders sums unless asked, so a lane
//! gives the same bits at any width: [`inverse`] (one direction) is this kernel at one lane.
//! Natively and in the design worker's module; the page's size-tuned module keeps the slices'
//! series ([`crate::optics::lc::slice`], Builds) and declines every direction.

use crate::optics::lc::slice::Slices;
use crate::precision::{SLICE_ROOTS_APART, SLICE_STEP_PHASE};
use nalgebra::Matrix3;
use num_complex::Complex64;

/// Two columns of four complex numbers: tangential fields ψ of two waves.
pub type Columns = [[Complex64; 4]; 2];

/// Directions per block: four natively (two SSE2 registers a number), two in WebAssembly (one
/// 128-bit SIMD register; four made the module 12 KB larger and no faster).
pub const LANES: usize = if cfg!(target_arch = "wasm32") { 2 } else { 4 };

/// Below this |θ (q_z,o₋ − q_z,e₊)| the slice's divided difference f[e₊, o₋] needs its series
/// (`optics::lc::slice`): such a direction is declined.
const SERIES_BELOW: f64 = 0.125;

/// The largest half phase θ|q_z,e − q_z,o|/2 between a slice's o and e waves taken by
/// [`sin_cos`]; a direction beyond it in any slice is declined.
const HALF_GAP: f64 = 0.25;

/// Position of entry (i, j), i ≤ j, of a symmetric 4×4 matrix kept as its upper triangle.
const fn at(i: usize, j: usize) -> usize {
    if i > j { at(j, i) } else { [0, 4, 7, 9][i] + j - i }
}

/// A slice's numbers that do not depend on the direction.
#[derive(Debug, Clone, Copy)]
struct Plan {
    /// ε_zz, ε_xz, ε_yz, ε_xx, ε_xy, ε_yy: the e wave's quadratic.
    zz: f64,
    xz: f64,
    yz: f64,
    xx: f64,
    xy: f64,
    yy: f64,
    /// 1/ε_zz, ε_xz/ε_zz, ε_yz/ε_zz.
    inv_zz: f64,
    gx: f64,
    gy: f64,
    /// ε_xx − ε_xz²/ε_zz, ε_xy − ε_xz ε_yz/ε_zz, ε_yy − ε_yz²/ε_zz.
    a00: f64,
    a01: f64,
    a11: f64,
}

impl Plan {
    fn of(eps: &Matrix3<f64>) -> Plan {
        let zz = eps[(2, 2)];
        let (xz, yz) = (eps[(0, 2)], eps[(1, 2)]);
        let inv_zz = 1.0 / zz;
        let (gx, gy) = (xz * inv_zz, yz * inv_zz);
        Plan {
            zz,
            xz,
            yz,
            xx: eps[(0, 0)],
            xy: eps[(0, 1)],
            yy: eps[(1, 1)],
            inv_zz,
            gx,
            gy,
            a00: eps[(0, 0)] - xz * gx,
            a01: eps[(0, 1)] - xz * gy,
            a11: eps[(1, 1)] - yz * gy,
        }
    }
}

/// 1/((2k)(2k + 1)) and 1/((2k − 1)(2k)) for k = 1 to 6: the factors of sin x/x's and cos x's
/// Taylor series in nested form.
const SIN_FACTORS: [f64; 6] = {
    let mut f = [0.0; 6];
    let mut k = 0;
    while k < 6 {
        let m = 2.0 * (k + 1) as f64;
        f[k] = 1.0 / (m * (m + 1.0));
        k += 1;
    }
    f
};
const COS_FACTORS: [f64; 6] = {
    let mut f = [0.0; 6];
    let mut k = 0;
    while k < 6 {
        let m = 2.0 * (k + 1) as f64;
        f[k] = 1.0 / ((m - 1.0) * m);
        k += 1;
    }
    f
};

/// sin x and cos x by their Taylor polynomials (7 terms each, to x¹³ and x¹²), for |x| ≤
/// [`HALF_GAP`]: the truncation is below 10⁻¹⁹ of the result there, and no range reduction or call is needed,
/// so it vectorizes.
#[inline(always)]
fn sin_cos(x: f64) -> (f64, f64) {
    let x2 = x * x;
    let mut s = 1.0;
    let mut c = 1.0;
    // sin x = x (1 − x²/(2·3) (1 − x²/(4·5) (…))), cos x = 1 − x²/(1·2) (1 − x²/(3·4) (…)).
    for k in (0..6).rev() {
        s = 1.0 - x2 * SIN_FACTORS[k] * s;
        c = 1.0 - x2 * COS_FACTORS[k] * c;
    }
    (x * s, c)
}

/// One number per lane.
#[derive(Debug, Clone, Copy)]
struct F<const W: usize>([f64; W]);

/// Lane by lane, by a plain loop (inlined into the vector builds).
macro_rules! lanewise {
    ($trait:ident, $method:ident, $op:tt) => {
        impl<const W: usize> std::ops::$trait for F<W> {
            type Output = F<W>;
            #[inline(always)]
            fn $method(self, o: F<W>) -> F<W> {
                let mut out = [0.0; W];
                for (i, x) in out.iter_mut().enumerate() {
                    *x = self.0[i] $op o.0[i];
                }
                F(out)
            }
        }
    };
}
lanewise!(Add, add, +);
lanewise!(Sub, sub, -);
lanewise!(Mul, mul, *);

impl<const W: usize> F<W> {
    #[inline(always)]
    fn splat(x: f64) -> F<W> {
        F([x; W])
    }
    #[inline(always)]
    fn map(self, f: impl Fn(f64) -> f64) -> F<W> {
        let mut out = self.0;
        for x in out.iter_mut() {
            *x = f(*x);
        }
        F(out)
    }
    #[inline(always)]
    fn scale(self, k: f64) -> F<W> {
        self.map(|x| x * k)
    }
}

/// A complex number per lane.
#[derive(Debug, Clone, Copy)]
struct C<const W: usize> {
    re: F<W>,
    im: F<W>,
}

impl<const W: usize> C<W> {
    #[inline(always)]
    fn mul(self, o: C<W>) -> C<W> {
        C {
            re: self.re * o.re - self.im * o.im,
            im: self.re * o.im + self.im * o.re,
        }
    }
    #[inline(always)]
    fn real(self, k: F<W>) -> C<W> {
        C {
            re: self.re * k,
            im: self.im * k,
        }
    }
    #[inline(always)]
    fn sub(self, o: C<W>) -> C<W> {
        C {
            re: self.re - o.re,
            im: self.im - o.im,
        }
    }
}

/// X J Y for symmetric X, Y whose product is symmetric (as A J A and A J A J A are), upper
/// triangle: (XJY)_ij = X_i0 Y_3j − X_i1 Y_2j − X_i2 Y_1j + X_i3 Y_0j.
#[inline(always)]
fn sym_j_mul<const W: usize>(x: &[F<W>; 10], y: &[F<W>; 10]) -> [F<W>; 10] {
    [
        sym_j_entry(x, y, 0, 0),
        sym_j_entry(x, y, 0, 1),
        sym_j_entry(x, y, 0, 2),
        sym_j_entry(x, y, 0, 3),
        sym_j_entry(x, y, 1, 1),
        sym_j_entry(x, y, 1, 2),
        sym_j_entry(x, y, 1, 3),
        sym_j_entry(x, y, 2, 2),
        sym_j_entry(x, y, 2, 3),
        sym_j_entry(x, y, 3, 3),
    ]
}

/// Entry (i, j) of [`sym_j_mul`].
#[inline(always)]
fn sym_j_entry<const W: usize>(x: &[F<W>; 10], y: &[F<W>; 10], i: usize, j: usize) -> F<W> {
    x[at(i, 0)] * y[at(3, j)] - x[at(i, 1)] * y[at(2, j)] - x[at(i, 2)] * y[at(1, j)] + x[at(i, 3)] * y[at(0, j)]
}

/// e^{iθg} − 1 = (−2 sin²(θg/2), 2 sin(θg/2) cos(θg/2)) lane by lane ([`sin_cos`]).
#[inline(always)]
fn cis_minus_one<const W: usize>(theta: f64, g: F<W>) -> C<W> {
    let (mut s, mut c) = (F([0.0; W]), F([0.0; W]));
    for l in 0..W {
        (s.0[l], c.0[l]) = sin_cos(0.5 * theta * g.0[l]);
    }
    C {
        re: (s * s).scale(-2.0),
        im: (s * c).scale(2.0),
    }
}

/// 1/x lane by lane.
#[inline(always)]
fn recip<const W: usize>(x: F<W>) -> F<W> {
    x.map(|x| 1.0 / x)
}

/// H = M⁻¹ X for the transfer matrix M of `slices` at each of the `W` tangential wave vectors
/// `qt` (vacuum wave number `k0_per_um`) and that lane's two columns X = `start`, each `None`
/// where the direction is declined (module header).
// The lane loops index several arrays by the lane at once.
#[allow(clippy::needless_range_loop)]
#[inline(never)]
fn block<const W: usize>(
    slices: &Slices,
    plans: &[Plan],
    k0_per_um: f64,
    qt: &[[f64; 2]; W],
    start: &[Columns; W],
) -> [Option<Columns>; W] {
    let theta = k0_per_um * slices.h_um;
    let (no2, nn) = (slices.no * slices.no, slices.no * slices.no * slices.ne * slices.ne);
    let mut ok = [true; W];
    let (mut qx, mut qy, mut o) = (F([0.0; W]), F([0.0; W]), F([1.0; W]));
    let mut f0 = C {
        re: F([1.0; W]),
        im: F([0.0; W]),
    };
    for l in 0..W {
        let [x, y] = qt[l];
        let o2 = no2 - (x * x + y * y);
        ok[l] = o2 > 0.0 && x.is_finite() && y.is_finite();
        if ok[l] {
            (qx.0[l], qy.0[l], o.0[l]) = (x, y, o2.sqrt());
        }
        (f0.im.0[l], f0.re.0[l]) = (theta * o.0[l]).sin_cos();
    }
    // 1/(λ2 − λ0) = −1/(2 q_z,o), the same in every slice; so is e^{iθλ2} = conj e^{iθλ0}.
    let r02 = o.map(|o| -0.5 / o);
    let f2 = C {
        re: f0.re,
        im: f0.im.scale(-1.0),
    };
    let (qxx, qxy, qyy) = (qx * qx, qx * qy, qy * qy);
    let zero = F::splat(0.0);
    // X, row-major (4 rows, 2 columns), lane by lane.
    let mut x: [C<W>; 8] = std::array::from_fn(|e| {
        let mut z = C { re: zero, im: zero };
        for l in 0..W {
            let v = start[l][e % 2][e / 2];
            (z.re.0[l], z.im.0[l]) = (v.re, v.im);
        }
        z
    });
    let mut fine = [true; W];
    // M⁻¹ = P_1⁻¹ ⋯ P_N⁻¹, the last slice first; P⁻¹ = exp(−iθΔ), the conjugate coefficients.
    for p in plans.iter().rev() {
        // The e waves' q_z, ordered as `slice::slice_roots` orders them.
        let b = qx.scale(p.xz) + qy.scale(p.yz);
        let c = qxx.scale(p.xx) + qxy.scale(2.0 * p.xy) + qyy.scale(p.yy) - F::splat(nn);
        let disc = b * b - c.scale(p.zz);
        let mut ep = zero;
        let mut em = zero;
        for l in 0..W {
            let (b, c, disc) = (b.0[l], c.0[l], disc.0[l]);
            let w = -(b + disc.max(0.0).sqrt().copysign(b));
            let (cw, wa) = (c / w, w * p.inv_zz);
            (ep.0[l], em.0[l]) = if b >= 0.0 { (cw, wa) } else { (wa, cw) };
            let (o, ep, em) = (o.0[l], ep.0[l], em.0[l]);
            let largest = o.max(ep.abs()).max(em.abs());
            fine[l] &= disc >= 0.0
                && (2.0 * o).min(ep - em).min((o - em).abs()) >= SLICE_ROOTS_APART
                && theta * largest <= SLICE_STEP_PHASE
                && (theta * (o + ep)).abs() >= SERIES_BELOW
                && ep != o
                && em != -o
                && (0.5 * theta * (ep - o)).abs() <= HALF_GAP
                && (0.5 * theta * (em + o)).abs() <= HALF_GAP;
        }
        let (g01, g12, g23) = (ep - o, zero - o - ep, em + o);
        let (r01, r12, r23) = (recip(g01), recip(g12), recip(g23));
        let (r13, r03) = (recip(em - ep), recip(em - o));
        // Newton's divided differences of e^{iθλ} (`slice::newton_real`), each division by a
        // difference of roots a product by its reciprocal.
        let t = f0.mul(cis_minus_one(theta, g01));
        let d01 = t.real(r01);
        let f1 = C {
            re: f0.re + t.re,
            im: f0.im + t.im,
        };
        let d23 = f2.mul(cis_minus_one(theta, g23)).real(r23);
        let d12 = f2.sub(f1).real(r12);
        let d012 = d12.sub(d01).real(r02);
        let d123 = d23.sub(d12).real(r13);
        let newton = [f0, d01, d012, d123.sub(d012).real(r03)];
        let lambda = [o, ep, zero - o, em];
        // Newton's form expanded into powers of Δ (`slice::power_coefficients`).
        let mut co = [
            newton[3],
            C { re: zero, im: zero },
            C { re: zero, im: zero },
            C { re: zero, im: zero },
        ];
        for (degree, j) in (0..3).rev().enumerate() {
            for i in (1..=degree + 1).rev() {
                co[i] = co[i - 1].sub(co[i].real(lambda[j]));
            }
            co[0] = newton[j].sub(co[0].real(lambda[j]));
        }
        // A = JΔ (Berreman's Δ of `slice::berreman_delta`, rows taken by J), A J A, A J A J A.
        let one = F::splat(1.0);
        let a = [
            F::splat(p.a00) - qyy,
            F::splat(p.a01) + qxy,
            qy.scale(p.gx),
            qx.scale(-p.gx),
            F::splat(p.a11) - qxx,
            qy.scale(p.gy),
            qx.scale(-p.gy),
            one - qyy.scale(p.inv_zz),
            qxy.scale(p.inv_zz),
            one - qxx.scale(p.inv_zz),
        ];
        let a2 = sym_j_mul(&a, &a);
        let a3 = sym_j_mul(&a2, &a);
        // S̄ = J exp(−iθΔ) = c̄0 J + c̄1 A + c̄2 AJA + c̄3 AJAJA.
        let mut sm: [C<W>; 10] = std::array::from_fn(|e| C {
            re: co[1].re * a[e] + co[2].re * a2[e] + co[3].re * a3[e],
            im: zero - (co[1].im * a[e] + co[2].im * a2[e] + co[3].im * a3[e]),
        });
        sm[at(0, 3)].re = sm[at(0, 3)].re + co[0].re;
        sm[at(0, 3)].im = sm[at(0, 3)].im - co[0].im;
        sm[at(1, 2)].re = sm[at(1, 2)].re - co[0].re;
        sm[at(1, 2)].im = sm[at(1, 2)].im + co[0].im;
        // X ← P⁻¹ X, P⁻¹ = J S̄: its row i is S̄'s row 3 − i, negated for rows 1 and 2.
        let old = x;
        for i in 0..4 {
            let row = 3 - i;
            for k in 0..2 {
                let mut sum = sm[at(row, 0)].mul(old[k]);
                for c in 1..4 {
                    let t = sm[at(row, c)].mul(old[2 * c + k]);
                    sum = C {
                        re: sum.re + t.re,
                        im: sum.im + t.im,
                    };
                }
                x[2 * i + k] = if i == 1 || i == 2 {
                    C {
                        re: zero - sum.re,
                        im: zero - sum.im,
                    }
                } else {
                    sum
                };
            }
        }
    }
    std::array::from_fn(|l| {
        let finite = x.iter().all(|z| z.re.0[l].is_finite() && z.im.0[l].is_finite());
        (ok[l] && fine[l] && finite).then(|| {
            std::array::from_fn(|k| std::array::from_fn(|i| Complex64::new(x[2 * i + k].re.0[l], x[2 * i + k].im.0[l])))
        })
    })
}

/// The slices' direction-independent numbers.
fn plans(slices: &Slices) -> Vec<Plan> {
    slices.eps.iter().map(Plan::of).collect()
}

/// Whether this build carries the kernel: not the page's size-tuned module (module header).
const BUILT: bool = cfg!(any(not(target_arch = "wasm32"), feature = "design-worker"));

/// H = M⁻¹ X for the transfer matrix M of `slices` at vacuum wave number `k0_per_um` and
/// tangential wave vector `qt` and two columns X = `start`: the lane kernel at one lane; `None`
/// where it declines the direction or is not built (the caller then takes M slice by slice,
/// [`Slices::transfer`]).
pub fn inverse(slices: &Slices, k0_per_um: f64, qt: [f64; 2], start: &Columns) -> Option<Columns> {
    if !BUILT {
        return None;
    }
    block::<1>(slices, &plans(slices), k0_per_um, &[qt], &[*start])[0]
}

/// [`inverse`] at each of `qts` with its columns in `starts` (the same bits), [`LANES`]
/// directions at a time.
pub fn inverse_each(slices: &Slices, k0_per_um: f64, qts: &[[f64; 2]], starts: &[Columns]) -> Vec<Option<Columns>> {
    if !BUILT {
        return vec![None; qts.len()];
    }
    let plans = plans(slices);
    let mut out = Vec::with_capacity(qts.len());
    for (qt, start) in qts.chunks(LANES).zip(starts.chunks(LANES)) {
        match (<&[[f64; 2]; LANES]>::try_from(qt), <&[Columns; LANES]>::try_from(start)) {
            (Ok(qt), Ok(start)) => out.extend(block::<LANES>(slices, &plans, k0_per_um, qt, start)),
            _ => out.extend(
                qt.iter()
                    .zip(start)
                    .map(|(&q, s)| block::<1>(slices, &plans, k0_per_um, &[q], &[*s])[0]),
            ),
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::optics::lc::director::{CellLayout, solve};
    use crate::precision::LC_SUBLAYERS;
    use crate::random::Rng;
    use std::f64::consts::{FRAC_PI_2, TAU};

    /// A twisted cell switched at 2.2 V and one at rest: their slices.
    fn cells() -> Vec<Slices> {
        let lc = crate::optics::lc::catalogue::find("5cb").unwrap().at(0.55, 25.0);
        [(5.0, 2.2, FRAC_PI_2), (2.52, 0.0, FRAC_PI_2), (4.0, 1.5, 0.0)]
            .iter()
            .map(|&(d, v, twist)| {
                let cell = CellLayout {
                    thickness_um: d,
                    rubbing_rad: 0.3,
                    twist_rad: twist,
                    pretilt_rad: 2f64.to_radians(),
                };
                Slices::new(&lc, &solve(&lc, &cell, v, LC_SUBLAYERS, None), d)
            })
            .collect()
    }

    /// Random columns.
    fn columns(rng: &mut Rng) -> Columns {
        std::array::from_fn(|_| std::array::from_fn(|_| Complex64::new(rng.uniform() - 0.5, rng.uniform() - 0.5)))
    }

    /// Independent evaluation: the kernel's M⁻¹ X (the slices' inverses in reverse order, each
    /// by its reciprocal form) against the slices' product one by one ([`Slices::transfer`],
    /// each slice's exponential a full 4×4 product) solved for X by an LU factorization, to
    /// 10⁻¹² of the columns' size, over random directions up to 80° in air and in a denser
    /// medium and random wavelengths; most are taken by the kernel.
    #[test]
    fn the_kernel_solves_the_slices_product() {
        let mut rng = Rng::new(21);
        let mut taken = 0;
        for slices in cells() {
            for _ in 0..300 {
                let q = 1.45 * rng.uniform();
                let phi = TAU * rng.uniform();
                let qt = [q * phi.cos(), q * phi.sin()];
                let k0 = TAU / (0.4 + 0.4 * rng.uniform());
                let x = columns(&mut rng);
                let Some(got) = inverse(&slices, k0, qt, &x) else {
                    continue;
                };
                taken += 1;
                let lu = slices.transfer(k0, qt).lu();
                for k in 0..2 {
                    let want = lu.solve(&nalgebra::Vector4::from(x[k])).unwrap();
                    let size = want.iter().map(|z| z.norm()).fold(1.0, f64::max);
                    let diff = (0..4).map(|i| (got[k][i] - want[i]).norm()).fold(0.0, f64::max);
                    assert!(diff <= 1e-12 * size, "qt {qt:?}, k0 {k0}: {diff:e} of {size}");
                }
            }
        }
        assert!(taken > 800, "{taken} of 900 directions taken by the kernel");
    }

    /// A lane gives the same bits at any width: blocks of [`LANES`] against one at a time, over
    /// directions some of which are declined (evanescent o waves beyond the ordinary index).
    #[test]
    fn the_blocks_give_the_one_by_one_bits() {
        let slices = &cells()[0];
        let k0 = TAU / 0.55;
        let mut rng = Rng::new(5);
        let qts: Vec<[f64; 2]> = (0..37).map(|i| [0.05 * i as f64 - 0.3, 0.045 * i as f64]).collect();
        let starts: Vec<Columns> = qts.iter().map(|_| columns(&mut rng)).collect();
        let each = inverse_each(slices, k0, &qts, &starts);
        assert!(each.iter().any(Option::is_none) && each.iter().any(Option::is_some));
        for ((h, &qt), x) in each.iter().zip(&qts).zip(&starts) {
            assert_eq!(*h, inverse(slices, k0, qt, x), "{qt:?}");
        }
    }
}

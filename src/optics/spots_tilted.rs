//! Spots of rays that leave in different directions (wedges, prisms): grouped where their
//! Gaussian beams overlap on the screen by position *and* direction, their fields added with the
//! full complex overlap.
//!
//! Physics (CONVENTIONS.md, version 2, "spots"; [`crate::optics::beam_overlap`]). Ray i stands for
//! a Gaussian beam g_i(r) = √(2/(πw²)) exp(−|r − r_i|²/w²) exp(i k t_i·r) on the screen, r_i its
//! screen point and t_i the transverse part of its direction; its Jones matrix M_i carries the
//! phase referred to the screen's axis point, as g_i's does. Two rays link when |γ_ij| ≥ e⁻²
//! (γ_ij = ∫ g_i g_j* dA, which falls with both their offset and their tilt); a spot is a
//! connected group, its coherency matrix C = Σ_ij γ_ij M_i C_in M_jᴴ (γ Hermitian, a Gram matrix,
//! so the Stokes vector is physical), its position the power-weighted mean of the points, its
//! direction the power-weighted mean direction, normalized.
//!
//! Rays that share one direction are grouped by [`crate::optics::spots::group_spots`], which is
//! fast for thousands of rays; this pairwise grouping serves the stacks whose rays fan out, which
//! hold few rays (each wedge pair splits in angle, and rays degrees apart never link).

use crate::optics::beam_overlap::GaussianBeam;
use crate::optics::jones::{Jones, JonesMatrix, to_json};
use crate::optics::spots::{Spot, coherency, power_of, stokes_of};
use crate::optics::stokes;
use crate::precision::SPOT_LINK_EXPONENT;
use crate::small_sort::sort_by_less;
use nalgebra::Vector3;
use num_complex::Complex64;

/// One output ray on the screen.
#[derive(Debug, Clone, Copy)]
pub struct ScreenRay<'a> {
    /// Its label.
    pub label: &'a str,
    /// Screen point [x, y], mm.
    pub pos: [f64; 2],
    /// Unit direction.
    pub dir: Vector3<f64>,
    /// Its Jones matrix, phase referred to the screen's axis point.
    pub m: JonesMatrix,
}

impl ScreenRay<'_> {
    fn tilt(&self) -> [f64; 2] {
        [self.dir.x, self.dir.y]
    }
}

fn gamma(beam: &GaussianBeam, a: &ScreenRay, b: &ScreenRay) -> Complex64 {
    beam.overlap(a.pos, a.tilt(), b.pos, b.tilt())
}

/// Groups rays of any directions into spots (module header), in the order of each spot's first
/// ray.
pub fn group_tilted(rays: &[ScreenRay], s_in: &[f64; 4], j_in: Option<&Jones>, beam: &GaussianBeam) -> Vec<Spot> {
    let n = rays.len();
    let mut spot_of: Vec<Option<usize>> = vec![None; n];
    let mut spots: Vec<Vec<usize>> = Vec::new();
    for start in 0..n {
        if spot_of[start].is_some() {
            continue;
        }
        let id = spots.len();
        let mut members = vec![start];
        spot_of[start] = Some(id);
        let mut k = 0;
        while k < members.len() {
            let i = members[k];
            for j in 0..n {
                if spot_of[j].is_none() && gamma(beam, &rays[i], &rays[j]).norm() >= (-SPOT_LINK_EXPONENT).exp() {
                    spot_of[j] = Some(id);
                    members.push(j);
                }
            }
            k += 1;
        }
        sort_by_less(&mut members, |a, b| a < b);
        spots.push(members);
    }
    spots.iter().map(|m| spot(rays, m, s_in, j_in, beam)).collect()
}

fn spot(rays: &[ScreenRay], members: &[usize], s_in: &[f64; 4], j_in: Option<&Jones>, beam: &GaussianBeam) -> Spot {
    let c_in = coherency(s_in);
    let mut c = JonesMatrix::zeros();
    for &i in members {
        for &j in members {
            let g = if i == j {
                Complex64::ONE
            } else {
                gamma(beam, &rays[i], &rays[j])
            };
            c += rays[i].m * c_in * rays[j].m.adjoint() * g;
        }
    }
    let st = stokes_of(&c);
    let powers: Vec<f64> = members.iter().map(|&i| power_of(&rays[i].m, s_in).max(0.0)).collect();
    let total: f64 = powers.iter().sum();
    let weight = |k: usize| {
        if total > 0.0 {
            powers[k] / total
        } else {
            1.0 / members.len() as f64
        }
    };
    let (mut pos, mut dir) = ([0.0, 0.0], Vector3::zeros());
    for (k, &i) in members.iter().enumerate() {
        pos[0] += weight(k) * rays[i].pos[0];
        pos[1] += weight(k) * rays[i].pos[1];
        dir += rays[i].dir * weight(k);
    }
    let dir = if dir.norm() > 0.0 {
        dir.normalize()
    } else {
        rays[members[0]].dir
    };
    let (mut var_r, mut var_t, mut spread) = (0.0, 0.0, 0.0f64);
    for (k, &i) in members.iter().enumerate() {
        let d = (rays[i].pos[0] - pos[0]).hypot(rays[i].pos[1] - pos[1]);
        let t = (rays[i].dir.x - dir.x).hypot(rays[i].dir.y - dir.y);
        var_r += weight(k) * d * d;
        var_t += weight(k) * t * t;
        spread = spread.max(d);
    }
    let w = beam.radius_mm;
    let overlap = (-4.0 * var_r / (w * w) - beam.k_per_mm * beam.k_per_mm * w * w * var_t).exp();
    let jones = j_in.map(|j| {
        let mut field = Jones::zeros();
        for &i in members {
            field += rays[i].m * j * beam.overlap(rays[i].pos, rays[i].tilt(), pos, [dir.x, dir.y]);
        }
        to_json(&field)
    });
    Spot {
        rays: members.iter().map(|&i| rays[i].label.to_string()).collect(),
        ray_index: members.to_vec(),
        position_mm: pos,
        spread_mm: spread,
        overlap,
        direction: [dir.x, dir.y, dir.z],
        power: st[0],
        stokes: st,
        degree_of_polarization: stokes::degree_of_polarization(&st),
        ellipse: stokes::ellipse(&st),
        jones,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::optics::jones;
    use crate::optics::spots::{Exit, group_spots};
    use crate::precision::assert_close;

    fn ray(label: &str, pos: [f64; 2], tilt: f64, m: JonesMatrix) -> ScreenRay<'_> {
        ScreenRay {
            label,
            pos,
            dir: Vector3::new(tilt, 0.0, (1.0 - tilt * tilt).sqrt()),
            m,
        }
    }

    /// Cross-method: rays of one direction give the same spots here as in the cell-based grouping
    /// of the plane-parallel trace.
    #[test]
    fn one_direction_agrees_with_the_cell_based_grouping() {
        let beam = GaussianBeam::new(0.4, 1e4);
        let j = jones::linear(0.5);
        let s_in = jones::stokes(&j);
        let ms = [
            jones::polarizer(0.0),
            jones::polarizer(1.0),
            jones::retarder(0.3, 0.2),
            jones::rotator(0.7),
        ];
        let points = [[0.0, 0.0], [0.1, 0.05], [1.0, 0.0], [1.2, 0.3]];
        let labels = ["a", "b", "c", "d"];
        let rays: Vec<ScreenRay> = (0..4).map(|i| ray(labels[i], points[i], 0.0, ms[i])).collect();
        let exits: Vec<Exit> = (0..4)
            .map(|i| Exit {
                label: labels[i],
                pos: points[i],
                m: ms[i],
            })
            .collect();
        let a = group_tilted(&rays, &s_in, Some(&j), &beam);
        let b = group_spots(&exits, &s_in, Some(&j), &beam, [0.0, 0.0, 1.0]);
        assert_eq!(a.len(), b.len());
        for (p, q) in a.iter().zip(&b) {
            assert_eq!(p.rays, q.rays);
            for k in 0..4 {
                assert_close(p.stokes[k], q.stokes[k], 1e-12, 1.0, "Stokes, both groupings");
            }
            assert_close(p.overlap, q.overlap, 1e-12, 0.0, "overlap figure");
        }
    }

    /// Two equal beams at one point, tilted apart: they link while the tilt term k²w²θ²/8 stays
    /// within e⁻² of amplitude (θ ≤ 4/(k w)), and their power follows |γ| (orthogonal
    /// polarizations add; equal ones interfere with the overlap).
    #[test]
    fn tilt_alone_separates_beams_at_the_link_limit() {
        let beam = GaussianBeam::new(1.0, 1e4);
        let limit = 4.0 / (beam.k_per_mm * beam.radius_mm);
        let j = jones::linear(0.0);
        let s_in = jones::stokes(&j);
        let half = JonesMatrix::identity() * Complex64::from(0.5f64.sqrt());
        for (theta, together) in [(0.9 * limit, true), (1.1 * limit, false)] {
            let rays = [
                ray("a", [0.0, 0.0], 0.5 * theta, half),
                ray("b", [0.0, 0.0], -0.5 * theta, half),
            ];
            let spots = group_tilted(&rays, &s_in, Some(&j), &beam);
            assert_eq!(spots.len() == 1, together, "θ = {theta}");
            if together {
                // P = ½ + ½ + 2·½·Re γ with γ = exp(−k²w²θ²/8) (beam_overlap.rs).
                let g = (-(beam.k_per_mm * beam.radius_mm * theta).powi(2) / 8.0).exp();
                assert_close(spots[0].power, 1.0 + g, 1e-9, 0.0, "two tilted coherent beams");
            }
        }
    }
}

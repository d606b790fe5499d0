//! Spots: output rays grouped where their beams overlap on the exit plane, with their fields added.
//!
//! Physics (`../shared/CONVENTIONS.md`, version 2, "spots"). Every ray stands for a Gaussian beam
//! of the scenario's diameter (`beam_overlap.rs`). Two rays are *linked* when the amplitude overlap
//! |γ| of their beams is at least e^−[`SPOT_LINK_EXPONENT`] = e⁻²; after plane-parallel plates every
//! ray leaves in the incident direction, so this is: their points lie at most one beam diameter
//! D apart (their circles in the end view touch). A spot is a connected group of linked rays,
//! listed in the order of its first ray. Its coherency matrix is the integral of E Eᴴ over the
//! plane, E = Σ_i M_i E_in g_i(r):
//!
//!   C = Σ_ij γ_ij M_i C_in M_jᴴ,   γ_ii = 1,
//!
//! so each pair's interference is weighted by the overlap of its beams, the Stokes vector is
//! physical for any input (γ is a Gram matrix), and powers add where fields do not interfere.
//! Interference between separate spots (|γ| < e⁻², at most 2e⁻²√(P_i P_j) per pair, none between
//! orthogonal polarizations such as a displacer's) is left out.
//!
//! Cost. Rays within [`SITE_FRACTION_OF_RADIUS`] share a *site* (γ = 1 to the last bit) and are
//! summed first. Linking runs over cells D/√2 wide: rays in one cell are always linked, and two
//! cells up to two apart are compared ray by ray only until one pair links them. The sum over pairs
//! is done pair by pair (far pairs skipped, [`OVERLAP_NEGLIGIBLE_EXPONENT`]) for small spots, and
//! for large ones as the integral itself: the matrix field Φ(r) = Σ_a F_a g_a(r) on a square grid
//! of step [`GRID_STEP_OF_RADIUS`]·w, each beam cut off at [`GRID_REACH_OF_RADIUS`]·w, and
//! C = h² Σ Φ C_in Φᴴ (the trapezoid rule, whose error for Gaussians of width w falls as
//! exp(−π²w²/(2h²)); cross-checked against the pair sum in the tests). Thousands of rays
//! in one spot cost milliseconds instead of the seconds of every pair.

use crate::optics::beam_overlap::GaussianBeam;
use crate::optics::jones::{Jones, JonesMatrix};
use crate::optics::jones::{JonesJson, to_json};
use crate::optics::stokes::{self, Ellipse};
use crate::precision::{OVERLAP_NEGLIGIBLE_EXPONENT, SITE_FRACTION_OF_RADIUS, SPOT_LINK_EXPONENT};
use crate::small_sort::sort_by_less;
use num_complex::Complex64;
use serde::Serialize;
use std::f64::consts::PI;

/// Grid step of the large-spot integral, as a fraction of the beam radius w: the trapezoid rule's
/// relative error exp(−π²/(2·0.4²)) ≈ 4·10⁻¹⁴.
pub const GRID_STEP_OF_RADIUS: f64 = 0.4;

/// Reach of each beam on that grid, in beam radii: beyond 5.5 w a beam's field is below
/// exp(−30) ≈ 10⁻¹³ of its peak.
pub const GRID_REACH_OF_RADIUS: f64 = 5.5;

/// Largest grid (points) the large-spot integral may use; beyond it, the pair sum.
const GRID_MAX_POINTS: usize = 1 << 18;

/// Output rays whose Gaussian beams overlap on the exit plane, with their fields added, each pair
/// weighted by the overlap of its two beams (`beam_overlap.rs`).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Spot {
    /// Labels of the rays in this spot, in the order of `rays`.
    pub rays: Vec<String>,
    /// Indices of those rays in the result's `rays` (not serialized: the labels say the same).
    #[serde(skip)]
    pub ray_index: Vec<usize>,
    /// Centre of the spot [x, y], mm: the power-weighted mean of its rays' exit points (their
    /// plain mean when none carries power); the first ray's point when they coincide.
    pub position_mm: [f64; 2],
    /// Largest distance of a member ray from that point, mm.
    pub spread_mm: f64,
    /// How well the spot's beams coincide, 0 to 1: exp(−4σ²/w² − k²w²σ_t²) with σ², σ_t² the
    /// power-weighted variances of the rays' points and transverse directions; for two rays of
    /// equal power, their power coupling exp(−d²/w²) (Joyce & DeLoach); 1 when they coincide.
    pub overlap: f64,
    /// Unit direction.
    pub direction: [f64; 3],
    /// Power of the coherent sum, ∫|Σ E_i|² over the plane.
    pub power: f64,
    /// Stokes vector of the coherent sum, integrated over the plane.
    pub stokes: [f64; 4],
    /// Degree of polarization (below 1 where beams of different polarization overlap partly).
    pub degree_of_polarization: f64,
    /// Polarization ellipse.
    pub ellipse: Ellipse,
    /// Jones vector of the field in one Gaussian beam centred on the spot (fully polarized input
    /// only): Σ γ_i J_i, with γ_i the overlap of ray i's beam with that beam. It is the coherent
    /// sum Σ J_i when the rays coincide; otherwise |J|² ≤ `power`.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub jones: Option<JonesJson>,
}

/// Spots with more rays than this are named by their first two and a count.
const NAMED_RAYS: usize = 4;

impl Spot {
    /// The spot's name in views: its rays' labels joined by "+" ("out" for the ray of a stack
    /// without crystals); past four rays the first two, "…" and the count ("oo+oe+… (4096 rays)"),
    /// so that a label stays short however many rays a spot holds.
    pub fn name(&self) -> String {
        let n = self.rays.len();
        if n > NAMED_RAYS {
            return format!("{}+{}+… ({n} rays)", self.rays[0], self.rays[1]);
        }
        let name = self.rays.join("+");
        if name.is_empty() { "out".to_string() } else { name }
    }
}

/// One output ray as the grouping sees it.
#[derive(Debug, Clone, Copy)]
pub struct Exit<'a> {
    /// Its label.
    pub label: &'a str,
    /// Exit point [x, y], mm.
    pub pos: [f64; 2],
    /// Its Jones matrix (input field → output field), phases included.
    pub m: JonesMatrix,
}

/// The coherency matrix C = ½ [[S0 + S1, S2 + iS3], [S2 − iS3, S0 − S1]] of a Stokes vector.
pub fn coherency(s: &[f64; 4]) -> JonesMatrix {
    let c12 = Complex64::new(0.5 * s[2], 0.5 * s[3]);
    JonesMatrix::new(
        (0.5 * (s[0] + s[1])).into(),
        c12,
        c12.conj(),
        (0.5 * (s[0] - s[1])).into(),
    )
}

/// Power of a path for input Stokes vector `s_in`: tr(M C Mᴴ) with C the input's coherency
/// matrix (the same number as Mueller(M)·S, row 0, at a fraction of the cost).
pub fn power_of(m: &JonesMatrix, s_in: &[f64; 4]) -> f64 {
    (m * coherency(s_in) * m.adjoint()).trace().re
}

/// The Stokes vector of a coherency matrix.
pub fn stokes_of(c: &JonesMatrix) -> [f64; 4] {
    [
        c[(0, 0)].re + c[(1, 1)].re,
        c[(0, 0)].re - c[(1, 1)].re,
        2.0 * c[(0, 1)].re,
        2.0 * c[(0, 1)].im,
    ]
}

/// The overlap γ of the beams of two rays at points `p`, `q` that leave in one direction (as
/// every ray after plane-parallel plates does): real, exp(−d²/(2w²)).
fn same_direction_overlap(beam: &GaussianBeam, p: [f64; 2], q: [f64; 2]) -> f64 {
    (-beam.overlap_exponent([p[0] - q[0], p[1] - q[1]], [0.0, 0.0])).exp()
}

/// Orders (x, y, index) triples by x, then y, then index.
fn sort_keyed(v: &mut [(f64, f64, usize)]) {
    sort_by_less(v, |a, b| {
        a.0.total_cmp(&b.0)
            .then(a.1.total_cmp(&b.1))
            .then(a.2.cmp(&b.2))
            .is_lt()
    });
}

fn root(parent: &mut [usize], mut i: usize) -> usize {
    while parent[i] != i {
        parent[i] = parent[parent[i]];
        i = parent[i];
    }
    i
}

fn join(parent: &mut [usize], a: usize, b: usize) {
    let (ra, rb) = (root(parent, a), root(parent, b));
    if ra != rb {
        parent[ra.max(rb)] = ra.min(rb);
    }
}

/// Groups rays into spots (see the module header) and adds their fields. `direction` is the
/// common direction of every ray after the stack.
pub fn group_spots(
    exits: &[Exit],
    s_in: &[f64; 4],
    j_in: Option<&Jones>,
    beam: &GaussianBeam,
    direction: [f64; 3],
) -> Vec<Spot> {
    // Plain loops over index arrays throughout: each iterator chain that collects into a new
    // type costs the page's WebAssembly a copy of generic code.
    let w = beam.radius_mm;
    let (site_of, site_pos) = sites(exits, SITE_FRACTION_OF_RADIUS * w);
    // With one direction for all rays, |γ| ≥ e⁻² ⇔ d ≤ D·√(2/2) = D.
    let reach = 2.0 * w * (SPOT_LINK_EXPONENT / 2.0).sqrt();
    let mut parent = link_sites(&site_pos, reach);
    let members = Members::new(&mut parent, &site_of);
    // Each site's matrix, its rays summed in ray order.
    let mut site_m: Vec<JonesMatrix> = Vec::with_capacity(site_pos.len());
    for _ in 0..site_pos.len() {
        site_m.push(JonesMatrix::zeros());
    }
    for (i, e) in exits.iter().enumerate() {
        site_m[site_of[i]] += e.m;
    }

    let sum = SpotSum {
        exits,
        s_in,
        c_in: coherency(s_in),
        j_in,
        beam,
        direction,
    };
    let mut out = Vec::with_capacity(members.spots);
    let mut fields: Vec<([f64; 2], JonesMatrix)> = Vec::new();
    for s in 0..members.spots {
        let rays = &members.ray_list[members.ray_start[s]..members.ray_start[s + 1]];
        fields.clear();
        for &k in &members.site_list[members.site_start[s]..members.site_start[s + 1]] {
            fields.push((site_pos[k], site_m[k]));
        }
        out.push(sum.spot(rays, &fields));
    }
    out
}

/// Step 1, sites: rays at one point (within `eps`), found by sorting by position and merging
/// each ray with the current site's lead ray. Returns each ray's site and each site's point.
fn sites(exits: &[Exit], eps: f64) -> (Vec<usize>, Vec<[f64; 2]>) {
    let n = exits.len();
    let mut order: Vec<(f64, f64, usize)> = Vec::with_capacity(n);
    for (i, e) in exits.iter().enumerate() {
        order.push((e.pos[0], e.pos[1], i));
    }
    sort_keyed(&mut order);
    let mut site_of = vec![0; n];
    let mut site_pos: Vec<[f64; 2]> = Vec::new();
    for &(x, y, i) in &order {
        let near = site_pos
            .last()
            .is_some_and(|p| (p[0] - x).abs() <= eps && (p[1] - y).abs() <= eps);
        if !near {
            site_pos.push([x, y]);
        }
        site_of[i] = site_pos.len() - 1;
    }
    (site_of, site_pos)
}

/// Step 2, links: joins every two sites at most `reach` apart; returns the union-find parents.
///
/// Cells reach/√2 wide: any two sites in one cell are linked; linked sites lie at most two
/// cells apart. A sorted list of (cell x, cell y, site) rather than a hash map: as fast here,
/// and far less WebAssembly.
fn link_sites(site_pos: &[[f64; 2]], reach: f64) -> Vec<usize> {
    let sites = site_pos.len();
    let size = reach / 2f64.sqrt();
    let mut grid: Vec<(f64, f64, usize)> = Vec::with_capacity(sites);
    for (k, p) in site_pos.iter().enumerate() {
        grid.push(((p[0] / size).floor(), (p[1] / size).floor(), k));
    }
    sort_keyed(&mut grid);
    let mut cells: Vec<(usize, usize)> = Vec::new(); // [start, end) in `grid`
    for (m, e) in grid.iter().enumerate() {
        match cells.last_mut() {
            Some(c) if same_cell(&grid[c.0], e.0, e.1) => c.1 = m + 1,
            _ => cells.push((m, m + 1)),
        }
    }
    let mut parent: Vec<usize> = (0..sites).collect();
    for &(s, e) in &cells {
        for m in s + 1..e {
            join(&mut parent, grid[s].2, grid[m].2);
        }
    }
    let linked = |a: usize, b: usize| {
        let (p, q) = (site_pos[a], site_pos[b]);
        (p[0] - q[0]).hypot(p[1] - q[1]) <= reach
    };
    for &(s, e) in &cells {
        let (cx, cy) = (grid[s].0, grid[s].1);
        for dx in -2..=2 {
            for dy in -2..=2 {
                // Each pair of cells once: the neighbour later in the sorted order.
                if (dx, dy) <= (0, 0) {
                    continue;
                }
                let (x, y) = (cx + dx as f64, cy + dy as f64);
                let start = grid.partition_point(|g| g.0 < x || (g.0 == x && g.1 < y));
                let mut end = start;
                while end < grid.len() && same_cell(&grid[end], x, y) {
                    end += 1;
                }
                if start == end || root(&mut parent, grid[s].2) == root(&mut parent, grid[start].2) {
                    continue;
                }
                'pairs: for ga in &grid[s..e] {
                    for gb in &grid[start..end] {
                        if linked(ga.2, gb.2) {
                            join(&mut parent, ga.2, gb.2);
                            break 'pairs;
                        }
                    }
                }
            }
        }
    }
    parent
}

/// Whether a (cell x, cell y, site) entry lies in cell (x, y).
fn same_cell(a: &(f64, f64, usize), x: f64, y: f64) -> bool {
    a.0 == x && a.1 == y
}

/// Step 3, spots: the connected groups, numbered in the order of their first ray; each spot's
/// rays and sites as ranges of two lists (rays in ray order).
struct Members {
    /// How many spots.
    spots: usize,
    /// Spot s's rays are `ray_list[ray_start[s]..ray_start[s + 1]]`.
    ray_start: Vec<usize>,
    ray_list: Vec<usize>,
    /// Spot s's sites are `site_list[site_start[s]..site_start[s + 1]]`.
    site_start: Vec<usize>,
    site_list: Vec<usize>,
}

impl Members {
    /// Numbers the groups of `parent` by their first ray (`site_of` each ray's site).
    fn new(parent: &mut [usize], site_of: &[usize]) -> Members {
        let sites = parent.len();
        let mut spot_of_root = vec![usize::MAX; sites];
        let mut spot_of_ray = vec![0; site_of.len()];
        let mut spots = 0;
        for (i, s) in spot_of_ray.iter_mut().enumerate() {
            let r = root(parent, site_of[i]);
            if spot_of_root[r] == usize::MAX {
                spot_of_root[r] = spots;
                spots += 1;
            }
            *s = spot_of_root[r];
        }
        let (ray_start, ray_list) = ranges(&spot_of_ray, spots);
        let mut spot_of_site = vec![0; sites];
        for (k, s) in spot_of_site.iter_mut().enumerate() {
            *s = spot_of_root[root(parent, k)];
        }
        let (site_start, site_list) = ranges(&spot_of_site, spots);
        Members {
            spots,
            ray_start,
            ray_list,
            site_start,
            site_list,
        }
    }
}

/// The members of each of `spots` groups, `of` giving each member's group: (start of each
/// group's range, plus the end; the members in group order, each group in member order).
fn ranges(of: &[usize], spots: usize) -> (Vec<usize>, Vec<usize>) {
    let mut start = vec![0; spots + 1];
    for &s in of {
        start[s + 1] += 1;
    }
    for s in 0..spots {
        start[s + 1] += start[s];
    }
    let mut list = vec![0; of.len()];
    for (i, &s) in of.iter().enumerate() {
        list[start[s]] = i;
        start[s] += 1;
    }
    // Each start has moved to the next spot's: shift back.
    for s in (0..spots).rev() {
        start[s + 1] = start[s];
    }
    start[0] = 0;
    (start, list)
}

/// Step 4, the sums: what every spot's figures are made from.
struct SpotSum<'a, 'b> {
    exits: &'b [Exit<'a>],
    s_in: &'b [f64; 4],
    /// The input's coherency matrix.
    c_in: JonesMatrix,
    j_in: Option<&'b Jones>,
    beam: &'b GaussianBeam,
    direction: [f64; 3],
}

impl SpotSum<'_, '_> {
    /// One spot of the rays `rays`, whose sites are `fields` (point, summed matrix).
    fn spot(&self, rays: &[usize], fields: &[([f64; 2], JonesMatrix)]) -> Spot {
        let (centre, spread, overlap) = self.centre(rays);
        let (s_in, beam) = (self.s_in, self.beam);
        let st = if fields.len() == 1 {
            // Rays at one point: the plain coherent sum.
            stokes::apply(&stokes::mueller(&fields[0].1), s_in)
        } else {
            stokes_of(&spot_coherency(fields, &self.c_in, beam))
        };
        let jones = self.j_in.map(|j| {
            let mut field = Jones::zeros();
            for (p, f) in fields {
                field += f * j * Complex64::from(same_direction_overlap(beam, *p, centre));
            }
            to_json(&field)
        });
        let mut labels = Vec::with_capacity(rays.len());
        for &i in rays {
            labels.push(self.exits[i].label.to_string());
        }
        Spot {
            rays: labels,
            ray_index: rays.to_vec(),
            position_mm: centre,
            spread_mm: spread,
            overlap,
            direction: self.direction,
            power: st[0],
            stokes: st,
            degree_of_polarization: stokes::degree_of_polarization(&st),
            ellipse: stokes::ellipse(&st),
            jones,
        }
    }

    /// The centre, spread and overlap figure of the rays `rays`, from their own powers (plain
    /// weights if all are dark).
    fn centre(&self, rays: &[usize]) -> ([f64; 2], f64, f64) {
        let pos = |i: usize| self.exits[i].pos;
        let first = pos(rays[0]);
        let mut weights = Vec::with_capacity(rays.len());
        let mut total = 0.0;
        for &i in rays {
            let p = power_of(&self.exits[i].m, self.s_in).max(0.0);
            weights.push(p);
            total += p;
        }
        let weight = |k: usize| {
            if total > 0.0 {
                weights[k] / total
            } else {
                1.0 / rays.len() as f64
            }
        };
        let mut off = [0.0, 0.0];
        for (k, &i) in rays.iter().enumerate() {
            off[0] += weight(k) * (pos(i)[0] - first[0]);
            off[1] += weight(k) * (pos(i)[1] - first[1]);
        }
        let centre = [first[0] + off[0], first[1] + off[1]];
        let (mut variance, mut spread) = (0.0, 0.0f64);
        for (k, &i) in rays.iter().enumerate() {
            let d = (pos(i)[0] - centre[0]).hypot(pos(i)[1] - centre[1]);
            variance += weight(k) * d * d;
            spread = spread.max(d);
        }
        let overlap = (-2.0 * self.beam.overlap_exponent([2.0 * variance.sqrt(), 0.0], [0.0, 0.0])).exp();
        (centre, spread, overlap)
    }
}

/// C = Σ_ab γ_ab F_a C_in F_bᴴ over sites (point, summed matrix) of one direction, by the pair
/// sum or the grid integral, whichever costs less (both the same number to ~10⁻¹³).
fn spot_coherency(fields: &[([f64; 2], JonesMatrix)], c_in: &JonesMatrix, beam: &GaussianBeam) -> JonesMatrix {
    let k = fields.len() as f64;
    let (points, _) = grid_shape(fields, beam);
    let per_site = (2.0 * GRID_REACH_OF_RADIUS / GRID_STEP_OF_RADIUS + 1.0).powi(2);
    // Rough flop counts: 40 per pair, 8 per site and grid point plus 30 per grid point.
    let pair_cost = 20.0 * k * k;
    let grid_cost = 8.0 * per_site * k + 30.0 * points as f64;
    if points <= GRID_MAX_POINTS && grid_cost < pair_cost {
        on_grid(fields, c_in, beam)
    } else {
        pairwise(fields, c_in, beam)
    }
}

/// The grid for [`on_grid`]: (number of points, (x0, y0, nx, ny, h)).
fn grid_shape(fields: &[([f64; 2], JonesMatrix)], beam: &GaussianBeam) -> (usize, (f64, f64, usize, usize, f64)) {
    let w = beam.radius_mm;
    let h = GRID_STEP_OF_RADIUS * w;
    let reach = GRID_REACH_OF_RADIUS * w;
    let (mut x0, mut y0, mut x1, mut y1) = (f64::INFINITY, f64::INFINITY, f64::NEG_INFINITY, f64::NEG_INFINITY);
    for (p, _) in fields {
        x0 = x0.min(p[0]);
        y0 = y0.min(p[1]);
        x1 = x1.max(p[0]);
        y1 = y1.max(p[1]);
    }
    let span = |a: f64, b: f64| {
        let n = ((b - a + 2.0 * reach) / h).ceil() + 1.0;
        if n.is_finite() && n < 1e9 {
            n as usize
        } else {
            usize::MAX / 4
        }
    };
    let (nx, ny) = (span(x0, x1), span(y0, y1));
    (nx.saturating_mul(ny), (x0 - reach, y0 - reach, nx, ny, h))
}

/// The pair sum, pairs sorted along x so that far pairs end the inner loop.
fn pairwise(fields: &[([f64; 2], JonesMatrix)], c_in: &JonesMatrix, beam: &GaussianBeam) -> JonesMatrix {
    let w = beam.radius_mm;
    let mut idx: Vec<(f64, f64, usize)> = fields.iter().enumerate().map(|(a, f)| (f.0[0], 0.0, a)).collect();
    sort_keyed(&mut idx);
    let g: Vec<JonesMatrix> = fields.iter().map(|(_, f)| f * c_in).collect();
    let mut c = JonesMatrix::zeros();
    for (x, &(_, _, a)) in idx.iter().enumerate() {
        let (pa, fa) = fields[a];
        c += g[a] * fa.adjoint();
        for &(_, _, b) in &idx[x + 1..] {
            let (pb, fb) = fields[b];
            if (pb[0] - pa[0]).powi(2) / (2.0 * w * w) > OVERLAP_NEGLIGIBLE_EXPONENT {
                break;
            }
            let gamma = same_direction_overlap(beam, pa, pb);
            if gamma == 0.0 {
                continue;
            }
            let term = g[a] * fb.adjoint() * Complex64::from(gamma);
            c += term + term.adjoint();
        }
    }
    c
}

/// The integral ∫ Φ C_in Φᴴ dA of the matrix field Φ(r) = Σ_a F_a g_a(r) on a square grid.
fn on_grid(fields: &[([f64; 2], JonesMatrix)], c_in: &JonesMatrix, beam: &GaussianBeam) -> JonesMatrix {
    let w = beam.radius_mm;
    let (_, (x0, y0, nx, ny, h)) = grid_shape(fields, beam);
    let reach = GRID_REACH_OF_RADIUS * w;
    let norm = (2.0 / (PI * w * w)).sqrt();
    let mut phi = vec![[Complex64::ZERO; 4]; nx * ny];
    let mut gx: Vec<f64> = Vec::new();
    let mut gy: Vec<f64> = Vec::new();
    // The 1-D factors of exp(−|r − p|²/w²) over the grid lines within reach of p.
    let factors = |c: f64, origin: f64, n: usize, out: &mut Vec<f64>| -> usize {
        let lo = (((c - reach - origin) / h).floor().max(0.0) as usize).min(n);
        let hi = ((((c + reach - origin) / h).ceil() + 1.0).max(0.0) as usize).min(n);
        out.clear();
        out.extend((lo..hi).map(|m| {
            let d = origin + m as f64 * h - c;
            (-(d * d) / (w * w)).exp()
        }));
        lo
    };
    for (p, f) in fields {
        let mx = factors(p[0], x0, nx, &mut gx);
        let my = factors(p[1], y0, ny, &mut gy);
        let fm = [f[(0, 0)] * norm, f[(0, 1)] * norm, f[(1, 0)] * norm, f[(1, 1)] * norm];
        for (a, &ga) in gx.iter().enumerate() {
            let row = &mut phi[(mx + a) * ny + my..(mx + a) * ny + my + gy.len()];
            for (cell, &gb) in row.iter_mut().zip(&gy) {
                let v = ga * gb;
                for (z, &q) in cell.iter_mut().zip(&fm) {
                    *z += q * v;
                }
            }
        }
    }
    let mut c = JonesMatrix::zeros();
    for cell in &phi {
        let m = JonesMatrix::new(cell[0], cell[1], cell[2], cell[3]);
        c += m * c_in * m.adjoint();
    }
    c * Complex64::from(h * h)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::precision::assert_close;
    use crate::random::Rng;

    #[test]
    fn spots_are_the_connected_groups_of_rays_at_most_one_diameter_apart() {
        // Cross-method: the cell-based linking against every pair, over random clouds dense and
        // sparse, some rays exactly on top of each other.
        let mut rng = Rng::new(3);
        let beam = GaussianBeam::new(1.0, 1e4);
        for spread in [0.3, 2.0, 8.0] {
            let mut pos: Vec<[f64; 2]> = (0..300)
                .map(|_| [spread * rng.normal(), spread * rng.normal()])
                .collect();
            pos.extend_from_within(..20);
            let labels: Vec<String> = (0..pos.len()).map(|i| format!("r{i}")).collect();
            let exits: Vec<Exit> = pos
                .iter()
                .zip(&labels)
                .map(|(&p, l)| Exit {
                    label: l,
                    pos: p,
                    m: JonesMatrix::identity(),
                })
                .collect();
            let spots = group_spots(&exits, &[1.0, 0.0, 0.0, 0.0], None, &beam, [0.0, 0.0, 1.0]);
            let mut spot_of = vec![usize::MAX; pos.len()];
            for (s, spot) in spots.iter().enumerate() {
                for &i in &spot.ray_index {
                    spot_of[i] = s;
                }
            }
            // Brute force: flood fill over every pair within one diameter.
            let mut comp = vec![usize::MAX; pos.len()];
            for start in 0..pos.len() {
                if comp[start] != usize::MAX {
                    continue;
                }
                let mut stack = vec![start];
                comp[start] = start;
                while let Some(i) = stack.pop() {
                    for j in 0..pos.len() {
                        let d = (pos[i][0] - pos[j][0]).hypot(pos[i][1] - pos[j][1]);
                        if comp[j] == usize::MAX && d <= 1.0 {
                            comp[j] = start;
                            stack.push(j);
                        }
                    }
                }
            }
            for i in 0..pos.len() {
                for j in 0..pos.len() {
                    assert_eq!(
                        spot_of[i] == spot_of[j],
                        comp[i] == comp[j],
                        "spread {spread}: rays {i} and {j}"
                    );
                }
            }
            // Spots come in the order of their first ray, each with its rays in order.
            for w in spots.windows(2) {
                assert!(w[0].ray_index[0] < w[1].ray_index[0]);
            }
            assert!(spots.iter().all(|s| s.ray_index.windows(2).all(|p| p[0] < p[1])));
        }
    }

    #[test]
    fn the_grid_integral_matches_the_pair_sum() {
        // Cross-method: the two ways of summing a spot give one coherency matrix, for a cloud of
        // beams with random fields, some interfering strongly, and a partly polarized input.
        let mut rng = Rng::new(7);
        let beam = GaussianBeam::new(1.0, 1e4);
        let c = |r: &mut Rng| Complex64::new(r.normal(), r.normal());
        let fields: Vec<([f64; 2], JonesMatrix)> = (0..150)
            .map(|_| {
                (
                    [0.3 * rng.normal(), 0.5 * rng.normal()],
                    JonesMatrix::new(c(&mut rng), c(&mut rng), c(&mut rng), c(&mut rng)) * Complex64::from(0.1),
                )
            })
            .collect();
        let c_in = coherency(&[1.0, 0.3, -0.2, 0.4]);
        let a = pairwise(&fields, &c_in, &beam);
        let b = on_grid(&fields, &c_in, &beam);
        let scale = a.trace().re;
        for (x, y) in a.iter().zip(b.iter()) {
            assert_close(y.re, x.re, 1e-11, scale, "grid integral vs pair sum (re)");
            assert_close(y.im, x.im, 1e-11, scale, "grid integral vs pair sum (im)");
        }
    }
}

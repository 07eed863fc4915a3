//! Emplacing one crater on the height grid. Inside the rim the crater replaces the old surface
//! (excavation removes it); outside it adds its ejecta on top, so older craters stay visible
//! under a younger blanket and are cut where a younger rim crosses them.

use crate::patch::PatchGrid;
use crate::population::CraterPlan;
use crate::profile::{CraterProfile, PROFILE_EXTENT_RHO};
use rand::Rng;
use rayon::prelude::*;

/// The old surface is fully replaced inside `INHERIT_START_RHO` and fully kept beyond
/// `INHERIT_END_RHO`, blended smoothly across the rim (a demo choice).
const INHERIT_START_RHO: f64 = 0.8;
const INHERIT_END_RHO: f64 = 1.1;
/// The pre-impact reference surface is fitted on rings this far out, beyond the rim.
const REFERENCE_RINGS_RHO: [f64; 2] = [1.3, 1.6];
const REFERENCE_RING_SAMPLES: usize = 48;
/// A breach cuts the rim down to the surrounding level over its full width (softened over
/// `BREACH_EDGE_DEG` at each side) and opens the wall below it as a ramp from the floor level at
/// `BREACH_RAMP_RHO.0` to the surrounding level just outside the rim, like an outlet channel;
/// the cut fades out of the ejecta between the `BREACH_FADE_RHO` radii.
const BREACH_EDGE_DEG: f64 = 15.0;
const BREACH_RAMP_RHO: (f64, f64) = (0.7, 1.25);
const BREACH_FADE_RHO: (f64, f64) = (1.5, 2.5);
/// Boulder-strewn floor: boulders per floor post, floor radius in crater radii, boulder
/// heights and widths (Gaussian sigma in posts). Boulders are really metres across, far below
/// a post; at 30 m posts they show as sharp one-to-two-post bumps of a few metres.
const BOULDERS_PER_POST: f64 = 0.15;
const BOULDER_FLOOR_RHO: f64 = 0.5;
const BOULDER_HEIGHT_M: (f64, f64) = (1.5, 5.0);
const BOULDER_SIGMA_POSTS: (f64, f64) = (0.5, 1.0);

/// Emplace `plan` with its profile into `z` (row-major, `grid` sized). Hosts get a level,
/// smooth reference surface (their floors are level); other craters follow the local slope
/// and keep the small-scale roughness of `background` (the surface before any crater) inside,
/// so that a crater floor is not unnaturally smooth.
pub fn stamp_crater(
    z: &mut [f64],
    background: &[f64],
    grid: &PatchGrid,
    plan: &CraterPlan,
    profile: &CraterProfile,
) {
    let (w, h) = (grid.width_px, grid.height_px);
    let (sx, sy) = grid.ground_step_m(grid.lonlat(plan.col_px, plan.row_px).1);
    let r_m = plan.radius_m();
    let reference = fit_reference(z, grid, plan, sx, sy);
    let texture_weight = if plan.host { 0.0 } else { 1.0 };
    let texture_reference = fit_reference(background, grid, plan, sx, sy);
    let floor_m = profile.height_at_rho(0.0);
    let (ex, ey) = (PROFILE_EXTENT_RHO * r_m / sx, PROFILE_EXTENT_RHO * r_m / sy);
    let c0 = (plan.col_px - ex).floor().max(0.0) as usize;
    let c1 = ((plan.col_px + ex).ceil().max(0.0) as usize).min(w);
    let r0 = (plan.row_px - ey).floor().max(0.0) as usize;
    let r1 = ((plan.row_px + ey).ceil().max(0.0) as usize).min(h);
    if c0 >= c1 || r0 >= r1 {
        return;
    }
    z[r0 * w..r1 * w]
        .par_chunks_mut(w)
        .with_min_len(8)
        .enumerate()
        .for_each(|(k, row)| {
            let v = -((r0 + k) as f64 + 0.5 - plan.row_px) * sy;
            let bg_row = &background[(r0 + k) * w..(r0 + k + 1) * w];
            for (c, cell) in row.iter_mut().enumerate().take(c1).skip(c0) {
                let u = (c as f64 + 0.5 - plan.col_px) * sx;
                let rho = u.hypot(v) / r_m;
                if rho >= PROFILE_EXTENT_RHO {
                    continue;
                }
                let mut p = profile.height_at_rho(rho);
                if let Some(b) = plan.breach {
                    let azimuth = u.atan2(v).to_degrees();
                    let off = ((azimuth - b.azimuth_deg + 180.0).rem_euclid(360.0) - 180.0).abs();
                    let g = 1.0
                        - smoothstep(
                            (off - (0.5 * b.width_deg - BREACH_EDGE_DEG)) / (2.0 * BREACH_EDGE_DEG),
                        );
                    let fade = 1.0
                        - smoothstep(
                            (rho - BREACH_FADE_RHO.0) / (BREACH_FADE_RHO.1 - BREACH_FADE_RHO.0),
                        );
                    let cut = p.min(
                        floor_m
                            * (1.0
                                - smoothstep(
                                    (rho - BREACH_RAMP_RHO.0)
                                        / (BREACH_RAMP_RHO.1 - BREACH_RAMP_RHO.0),
                                )),
                    );
                    p += g * fade * (cut - p);
                }
                let keep =
                    smoothstep((rho - INHERIT_START_RHO) / (INHERIT_END_RHO - INHERIT_START_RHO));
                let texture = bg_row[c]
                    - (texture_reference.0 + texture_reference.1 * u + texture_reference.2 * v);
                let base =
                    reference.0 + reference.1 * u + reference.2 * v + texture_weight * texture;
                *cell = keep * *cell + (1.0 - keep) * base + p;
            }
        });
}

/// Scatter boulders over the floor of `plan`: many small sharp bumps a few metres high.
pub fn strew_boulders(z: &mut [f64], grid: &PatchGrid, plan: &CraterPlan, rng: &mut impl Rng) {
    let (w, h) = (grid.width_px as isize, grid.height_px as isize);
    let (sx, sy) = grid.ground_step_m(grid.lonlat(plan.col_px, plan.row_px).1);
    let floor_r_m = BOULDER_FLOOR_RHO * plan.radius_m();
    let floor_posts = std::f64::consts::PI * floor_r_m * floor_r_m / (sx * sy);
    let count = (BOULDERS_PER_POST * floor_posts).round().clamp(30.0, 600.0) as usize;
    for _ in 0..count {
        let (rr, th) = (
            floor_r_m * rng.gen::<f64>().sqrt(),
            rng.gen::<f64>() * std::f64::consts::TAU,
        );
        let (bc, br) = (
            plan.col_px + rr * th.sin() / sx,
            plan.row_px - rr * th.cos() / sy,
        );
        let height_m =
            BOULDER_HEIGHT_M.0 + rng.gen::<f64>() * (BOULDER_HEIGHT_M.1 - BOULDER_HEIGHT_M.0);
        let sigma = BOULDER_SIGMA_POSTS.0
            + rng.gen::<f64>() * (BOULDER_SIGMA_POSTS.1 - BOULDER_SIGMA_POSTS.0);
        let reach = (3.0 * sigma).ceil() as isize;
        let (ci, ri) = (bc.floor() as isize, br.floor() as isize);
        for r in (ri - reach).max(0)..(ri + reach + 1).min(h) {
            for c in (ci - reach).max(0)..(ci + reach + 1).min(w) {
                let (dc, dr) = (c as f64 + 0.5 - bc, r as f64 + 0.5 - br);
                z[r as usize * w as usize + c as usize] +=
                    height_m * (-(dc * dc + dr * dr) / (2.0 * sigma * sigma)).exp();
            }
        }
    }
}

/// Pre-impact surface around the crater as a + b u + c v (u east, v north, metres from the
/// centre): a least-squares plane through rings outside the rim, or their mean for hosts.
fn fit_reference(
    z: &[f64],
    grid: &PatchGrid,
    plan: &CraterPlan,
    sx: f64,
    sy: f64,
) -> (f64, f64, f64) {
    let (w, h) = (grid.width_px, grid.height_px);
    let mut pts: Vec<(f64, f64, f64)> =
        Vec::with_capacity(REFERENCE_RINGS_RHO.len() * REFERENCE_RING_SAMPLES);
    for &ring in &REFERENCE_RINGS_RHO {
        for k in 0..REFERENCE_RING_SAMPLES {
            let th = k as f64 / REFERENCE_RING_SAMPLES as f64 * std::f64::consts::TAU;
            let (u, v) = (
                ring * plan.radius_m() * th.sin(),
                ring * plan.radius_m() * th.cos(),
            );
            let (c, r) = (
                (plan.col_px + u / sx).floor(),
                (plan.row_px - v / sy).floor(),
            );
            if c >= 0.0 && r >= 0.0 && (c as usize) < w && (r as usize) < h {
                pts.push((u, v, z[r as usize * w + c as usize]));
            }
        }
    }
    if pts.is_empty() {
        let c = (plan.col_px.floor().max(0.0) as usize).min(w - 1);
        let r = (plan.row_px.floor().max(0.0) as usize).min(h - 1);
        return (z[r * w + c], 0.0, 0.0);
    }
    let mean = pts.iter().map(|p| p.2).sum::<f64>() / pts.len() as f64;
    if plan.host || pts.len() < 6 {
        return (mean, 0.0, 0.0);
    }
    fit_plane(&pts).unwrap_or((mean, 0.0, 0.0))
}

/// Least-squares plane z = a + b u + c v by the normal equations (Cramer's rule on 3 x 3).
fn fit_plane(pts: &[(f64, f64, f64)]) -> Option<(f64, f64, f64)> {
    let (mut n, mut su, mut sv, mut suu, mut svv, mut suv) = (0.0, 0.0, 0.0, 0.0, 0.0, 0.0);
    let (mut sz, mut suz, mut svz) = (0.0, 0.0, 0.0);
    for &(u, v, z) in pts {
        n += 1.0;
        su += u;
        sv += v;
        suu += u * u;
        svv += v * v;
        suv += u * v;
        sz += z;
        suz += u * z;
        svz += v * z;
    }
    let m = [[n, su, sv], [su, suu, suv], [sv, suv, svv]];
    let det3 = |m: [[f64; 3]; 3]| {
        m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1])
            - m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0])
            + m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0])
    };
    let d = det3(m);
    if d.abs() < 1e-12 * (n * suu * svv).abs().max(1e-300) {
        return None;
    }
    let rhs = [sz, suz, svz];
    let mut out = [0.0; 3];
    for (k, o) in out.iter_mut().enumerate() {
        let mut mk = m;
        for (row, &r) in mk.iter_mut().zip(rhs.iter()) {
            row[k] = r;
        }
        *o = det3(mk) / d;
    }
    Some((out[0], out[1], out[2]))
}

/// 0 below 0, 1 above 1, smooth (3t^2 - 2t^3) between.
#[inline]
fn smoothstep(t: f64) -> f64 {
    let t = t.clamp(0.0, 1.0);
    t * t * (3.0 - 2.0 * t)
}

//! The public entry points: fit a structure in a measured crater, and redraw its clearance map.

use crate::error::StructureError;
use crate::patch::Patch;
use crate::placement::{Ctx, Placement, SampleKind, CLEARANCE_TOLERANCE_M};
use crate::result::{Anchor, ClearanceMap, StructureFit};
use crate::rim::Crest;
use crate::spec::StructureSpec;
use craters::CraterMeasurement;
use terrain::ElevationGrid;

/// Cells per side of the clearance map kept in the survey file (24 x 24 f32 values, about 3 kB
/// of JSON a candidate); [`clearance_map`] redraws it finer for a close look.
pub const CLEARANCE_MAP_CELLS: usize = 24;
/// The aperture radius spans at most this many lattice cells (coarser posts give fewer), and the
/// lattice never exceeds `MAX_PATCH_NODES` per side, whatever the DEM's posts.
const MIN_CELLS_PER_RADIUS: f64 = 40.0;
const MAX_PATCH_NODES: f64 = 401.0;
/// Below this share of the aperture with elevation data the clearance is not known.
const MIN_APERTURE_VALID_FRACTION: f64 = 0.95;
const OUTLINE_POINTS: usize = 72;

/// Fit `spec` in `crater`, measured on `grid` (any window that holds the crater and its rim).
///
/// Searches the horizontal position and rotation of the structure (see [`crate::placement`]),
/// hangs the surface as deep as the clearance allows but never with its edge above the lowest
/// anchor, and reports clearance, anchors, spans and any excavation. A structure that does not
/// fit is an `Ok` with `fit_ok = false` and the reasons; `Err` is kept for a bad spec, a crater
/// without a traced rim, or a grid with no data there.
pub fn fit(
    grid: &ElevationGrid,
    crater: &CraterMeasurement,
    spec: &StructureSpec,
) -> Result<StructureFit, StructureError> {
    run(grid, crater, spec, false).map(|d| d.fit)
}

/// One point where the fit checked the clearance, in the crater's local azimuthal equidistant
/// frame (x east, y north, metres from the crater centre).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ClearanceSample {
    pub kind: SampleKind,
    pub x_m: f64,
    pub y_m: f64,
    /// Ground height the fit read there (bilinear on the terrain lattice), NaN without data.
    pub ground_m: f64,
}

/// A fit with the unrounded numbers its verdict was made on, for checking the verdict.
#[derive(Clone, Debug)]
pub struct FitDetail {
    /// The fit as [`fit`] returns it.
    pub fit: StructureFit,
    /// The structure's axis in the crater's local frame, metres.
    pub axis_xy_m: (f64, f64),
    pub vertex_height_m: f64,
    /// Ground height under each anchor, in the order of `fit.anchors` (NaN without data).
    pub anchor_heights_m: Vec<f64>,
    /// Every clearance sample of the placement: lattice nodes inside the aperture, the vertex,
    /// the edge points. The clearance at one is `vertex_height_m + spec.sag_m(r^2) - ground_m`,
    /// r its distance from the axis.
    pub samples: Vec<ClearanceSample>,
}

/// As [`fit`], also returning the clearance samples and the unrounded heights behind the
/// verdict.
pub fn fit_with_samples(
    grid: &ElevationGrid,
    crater: &CraterMeasurement,
    spec: &StructureSpec,
) -> Result<FitDetail, StructureError> {
    run(grid, crater, spec, true)
}

fn run(
    grid: &ElevationGrid,
    crater: &CraterMeasurement,
    spec: &StructureSpec,
    keep_samples: bool,
) -> Result<FitDetail, StructureError> {
    spec.validate()?;
    let (lon, lat) = (crater.centre_lon_deg, crater.centre_lat_deg);
    if !(lon.is_finite()
        && lat.is_finite()
        && crater.diameter_m.is_finite()
        && crater.diameter_m > 0.0)
    {
        return Err(StructureError::Crater(format!(
            "centre ({lon}, {lat}) or diameter {} m is not usable",
            crater.diameter_m
        )));
    }
    let crest = Crest::from_measurement(crater)?;
    let patch = terrain_patch(grid, crater, &crest, spec)?;
    let mut ctx = Ctx::new(&patch, &crest, spec, crater.diameter_m);
    let best = ctx.search();
    if best.vertical.valid == 0 {
        return Err(StructureError::NoData {
            lon_deg: lon,
            lat_deg: lat,
        });
    }
    let samples = if keep_samples {
        let mut v = Vec::new();
        ctx.for_samples(best.offset, |kind, x_m, y_m, ground_m, _| {
            v.push(ClearanceSample {
                kind,
                x_m,
                y_m,
                ground_m,
            })
        });
        v
    } else {
        Vec::new()
    };
    let mut out = assemble(&ctx, &best);
    out.clearance_map = clearance_map(grid, &out, spec, CLEARANCE_MAP_CELLS)?;
    Ok(FitDetail {
        axis_xy_m: best.offset,
        vertex_height_m: best.vertex_m,
        anchor_heights_m: best.anchors.iter().map(|a| a.height_m).collect(),
        samples,
        fit: tidy(out, spec),
    })
}

/// The terrain lattice round the crater: at the DEM's posts, coarsened so the aperture radius
/// spans at most `MIN_CELLS_PER_RADIUS` cells and the lattice at most `MAX_PATCH_NODES` a side.
fn terrain_patch(
    grid: &ElevationGrid,
    crater: &CraterMeasurement,
    crest: &Crest,
    spec: &StructureSpec,
) -> Result<Patch, StructureError> {
    let (lon, lat) = (crater.centre_lon_deg, crater.centre_lat_deg);
    let a = spec.aperture_radius_m();
    let pixel_m = pixel_size_m(grid, lon, lat)?;
    let half = (1.05 * crest.max_radius_m())
        .max(crate::placement::MAX_OFFSET_FRAC * crater.diameter_m + a);
    let cell = pixel_m
        .max(a / MIN_CELLS_PER_RADIUS)
        .max(2.0 * half / (MAX_PATCH_NODES - 5.0));
    let patch =
        Patch::build(grid, lon, lat, half + 2.0 * cell, cell).ok_or(StructureError::Geometry {
            lon_deg: lon,
            lat_deg: lat,
        })?;
    if patch.heights_m.iter().all(|h| h.is_nan()) {
        return Err(StructureError::NoData {
            lon_deg: lon,
            lat_deg: lat,
        });
    }
    Ok(patch)
}

fn pixel_size_m(grid: &ElevationGrid, lon: f64, lat: f64) -> Result<f64, StructureError> {
    let geom = &grid.geometry;
    let (c, r) = geom
        .lonlat_to_pixel(lon, lat)
        .ok_or(StructureError::Geometry {
            lon_deg: lon,
            lat_deg: lat,
        })?;
    let (px, py) = geom.pixel_size_m_at(c, r).ok_or(StructureError::Geometry {
        lon_deg: lon,
        lat_deg: lat,
    })?;
    let p = px.min(py);
    if p.is_finite() && p > 0.0 {
        Ok(p)
    } else {
        Err(StructureError::Geometry {
            lon_deg: lon,
            lat_deg: lat,
        })
    }
}

/// Smallest clearance over every sample of the placement, and where it is (local frame);
/// (NaN, axis) when no sample has data.
fn lowest_clearance(ctx: &Ctx, p: &Placement) -> (f64, (f64, f64)) {
    let (mut low, mut at) = (f64::INFINITY, p.offset);
    ctx.for_samples(p.offset, |_, x, y, g, sag| {
        let clearance = p.vertex_m + sag - g;
        if clearance < low {
            low = clearance;
            at = (x, y);
        }
    });
    (if low.is_finite() { low } else { f64::NAN }, at)
}

fn assemble(ctx: &Ctx, p: &Placement) -> StructureFit {
    let frame = &ctx.patch.frame;
    let spec = ctx.spec;
    let (clon, clat) = frame.to_lonlat(p.offset.0, p.offset.1);
    let (min_clearance_m, low_at) = lowest_clearance(ctx, p);
    let (mlon, mlat) = frame.to_lonlat(low_at.0, low_at.1);
    let short = min_clearance_m < spec.min_clearance_m - CLEARANCE_TOLERANCE_M;
    // Digging is reported exactly when the clearance falls short, and never as less than the
    // file's 1 m3 unit then, so a shortfall never reads as no digging.
    let excavation_m3 = if short {
        ctx.excavation_fine_m3(p.offset, p.vertex_m).ceil().max(1.0)
    } else if p.excavation_m3.is_finite() {
        0.0
    } else {
        f64::NAN
    };
    let edge_z = p.vertex_m + ctx.edge_sag_m;
    let anchors = placed_anchors(ctx, p, edge_z);
    let valid_fraction = p.vertical.valid as f64 / p.vertical.total.max(1) as f64;
    let reasons = verdict(
        ctx,
        p,
        &anchors,
        valid_fraction,
        min_clearance_m,
        excavation_m3,
    );
    StructureFit {
        fit_ok: reasons.is_empty(),
        reasons,
        centre_lon_deg: clon,
        centre_lat_deg: clat,
        offset_from_crater_centre_m: p.offset.0.hypot(p.offset.1),
        offset_azimuth_deg: p.offset.0.atan2(p.offset.1).to_degrees().rem_euclid(360.0),
        rotation_deg: p.rotation_deg,
        vertex_height_m: p.vertex_m,
        aperture_edge_height_m: edge_z,
        min_clearance_m,
        min_clearance_lon_deg: mlon,
        min_clearance_lat_deg: mlat,
        headroom_m: p.headroom_m,
        anchor_height_spread_m: p.spread_m,
        max_span_m: p.max_span_m,
        excavation_m3,
        aperture_valid_fraction: valid_fraction,
        anchors,
        aperture_outline_lonlat: outline(frame, p.offset, ctx.a_m),
        clearance_map: ClearanceMap::default(),
    }
}

fn placed_anchors(ctx: &Ctx, p: &Placement, edge_z: f64) -> Vec<Anchor> {
    p.anchors
        .iter()
        .map(|a| {
            let (lon, lat) = ctx.patch.frame.to_lonlat(a.x_m, a.y_m);
            let span_m = if a.height_m.is_finite() {
                (a.reach_m - ctx.a_m).hypot(a.height_m - edge_z)
            } else {
                f64::NAN
            };
            Anchor {
                lon_deg: lon,
                lat_deg: lat,
                azimuth_deg: a.azimuth_deg,
                height_m: a.height_m,
                span_m,
                on_crest: a.on_crest,
            }
        })
        .collect()
}

/// One sentence per requirement the placement fails; `fit_ok` is their absence.
fn verdict(
    ctx: &Ctx,
    p: &Placement,
    anchors: &[Anchor],
    valid_fraction: f64,
    min_clearance_m: f64,
    excavation_m3: f64,
) -> Vec<String> {
    let spec = ctx.spec;
    let c = spec.min_clearance_m;
    let mut reasons = Vec::new();
    if p.vertical.intrusion_m > 0.0 {
        reasons.push(format!(
            "the {:.0} m aperture does not fit inside the rim crest: at its best position its edge still reaches {:.0} m past the crest",
            spec.aperture_m, p.vertical.intrusion_m
        ));
    }
    let off: Vec<String> = anchors
        .iter()
        .enumerate()
        .filter(|(_, a)| !a.on_crest)
        .map(|(i, _)| (i + 1).to_string())
        .collect();
    if !off.is_empty() {
        reasons.push(format!(
            "anchor {} would stand where no rim crest was traced (a breach, a gap or no data)",
            off.join(", ")
        ));
    }
    if valid_fraction < MIN_APERTURE_VALID_FRACTION {
        reasons.push(format!("only {:.0}% of the aperture has elevation data: the clearance over the rest is unknown", 100.0 * valid_fraction));
    }
    if min_clearance_m.is_nan() || min_clearance_m < c - CLEARANCE_TOLERANCE_M {
        reasons.push(format!(
            "the crater is too shallow: with its edge level with the lowest anchor the surface clears the ground by {:.2} m, less than the {c} m wanted; about {excavation_m3:.0} m3 of ground would have to be removed",
            floor_cm(min_clearance_m)
        ));
    }
    if p.spread_m.is_nan() || p.spread_m > spec.max_anchor_height_difference_m {
        reasons.push(format!(
            "the anchors' heights differ by {:.2} m, more than the {} m allowed",
            ceil_cm(p.spread_m),
            spec.max_anchor_height_difference_m
        ));
    }
    reasons
}

fn floor_cm(v: f64) -> f64 {
    (v * 100.0).floor() / 100.0
}

fn ceil_cm(v: f64) -> f64 {
    (v * 100.0).ceil() / 100.0
}

/// Closed ring, counter-clockwise on a north-up map (azimuth decreasing), continuous in longitude.
fn outline(frame: &terrain::LocalFrame, d: (f64, f64), a: f64) -> Vec<(f64, f64)> {
    let mut pts: Vec<(f64, f64)> = (0..=OUTLINE_POINTS)
        .map(|k| {
            let az = -((k % OUTLINE_POINTS) as f64) * std::f64::consts::TAU / OUTLINE_POINTS as f64;
            frame.to_lonlat(d.0 + a * az.sin(), d.1 + a * az.cos())
        })
        .collect();
    let (lo, hi) = pts
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), p| {
            (l.min(p.0), h.max(p.0))
        });
    if hi - lo > 180.0 {
        for p in &mut pts {
            p.0 = p.0.rem_euclid(360.0);
        }
    }
    pts
}

/// Clearance of the placed surface over its aperture on a `cells` x `cells` grid (2 to 512),
/// resampled from `grid` around the aperture centre of `fit` (see [`ClearanceMap`]).
/// The survey keeps a 24 x 24 map; the GUI may ask for a finer one.
pub fn clearance_map(
    grid: &ElevationGrid,
    fit: &StructureFit,
    spec: &StructureSpec,
    cells: usize,
) -> Result<ClearanceMap, StructureError> {
    spec.validate()?;
    let (lon, lat) = (fit.centre_lon_deg, fit.centre_lat_deg);
    let cells = cells.clamp(2, 512);
    let a = spec.aperture_radius_m();
    let cell_m = spec.aperture_m / cells as f64;
    // Posts finer than half a map cell add nothing to a bilinear sample at the cell centre.
    let step_m = pixel_size_m(grid, lon, lat)?.max(0.5 * cell_m);
    let patch =
        Patch::build(grid, lon, lat, a + 2.0 * step_m, step_m).ok_or(StructureError::Geometry {
            lon_deg: lon,
            lat_deg: lat,
        })?;
    let mut map = ClearanceMap {
        centre_lon_deg: lon,
        centre_lat_deg: lat,
        cell_m,
        size: cells,
        values_m: vec![f32::NAN; cells * cells],
    };
    for row in 0..cells {
        for col in 0..cells {
            let (x, y) = map.cell_centre_xy_m(col, row);
            let r2 = x * x + y * y;
            if r2 <= a * a {
                let g = patch.sample(x, y);
                map.values_m[row * cells + col] = (fit.vertex_height_m + spec.sag_m(r2) - g) as f32;
            }
        }
    }
    Ok(map)
}

/// Round for a compact, stable file: degrees to 1e-7 (3 mm on the Moon), metres to 1 cm,
/// volumes to 1 m3, the clearance map to 1 cm. The two figures the verdict compares with the
/// spec are rounded towards the verdict, so the file never shows a failing clearance or spread
/// as meeting the spec, nor a passing one as missing it: a clearance short of the spec is
/// rounded down and one meeting it never below the spec's value; an anchor spread over the
/// limit is rounded up and one within it never above the limit.
fn tidy(mut f: StructureFit, spec: &StructureSpec) -> StructureFit {
    let deg = |v: f64| (v * 1e7).round() / 1e7;
    let m = |v: f64| (v * 100.0).round() / 100.0;
    f.centre_lon_deg = deg(f.centre_lon_deg);
    f.centre_lat_deg = deg(f.centre_lat_deg);
    f.min_clearance_lon_deg = deg(f.min_clearance_lon_deg);
    f.min_clearance_lat_deg = deg(f.min_clearance_lat_deg);
    f.offset_from_crater_centre_m = m(f.offset_from_crater_centre_m);
    f.offset_azimuth_deg = m(f.offset_azimuth_deg);
    f.rotation_deg = m(f.rotation_deg);
    f.vertex_height_m = m(f.vertex_height_m);
    f.aperture_edge_height_m = m(f.aperture_edge_height_m);
    let c = spec.min_clearance_m;
    f.min_clearance_m = if f.min_clearance_m >= c - CLEARANCE_TOLERANCE_M {
        m(f.min_clearance_m).max(c)
    } else {
        floor_cm(f.min_clearance_m)
    };
    f.headroom_m = m(f.headroom_m);
    let limit = spec.max_anchor_height_difference_m;
    f.anchor_height_spread_m = if f.anchor_height_spread_m <= limit {
        m(f.anchor_height_spread_m).min(limit)
    } else {
        ceil_cm(f.anchor_height_spread_m)
    };
    f.max_span_m = m(f.max_span_m);
    f.excavation_m3 = f.excavation_m3.round();
    f.aperture_valid_fraction = (f.aperture_valid_fraction * 1e4).round() / 1e4;
    for a in &mut f.anchors {
        a.lon_deg = deg(a.lon_deg);
        a.lat_deg = deg(a.lat_deg);
        a.azimuth_deg = m(a.azimuth_deg);
        a.height_m = m(a.height_m);
        a.span_m = m(a.span_m);
    }
    for p in &mut f.aperture_outline_lonlat {
        *p = (deg(p.0), deg(p.1));
    }
    let cm = &mut f.clearance_map;
    cm.centre_lon_deg = deg(cm.centre_lon_deg);
    cm.centre_lat_deg = deg(cm.centre_lat_deg);
    for v in &mut cm.values_m {
        *v = (*v * 100.0).round() / 100.0;
    }
    f
}

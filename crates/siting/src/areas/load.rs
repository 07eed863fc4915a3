//! Reading an area through GDAL/OGR: the layer, the attribute filter, the CRS (lunar lon/lat
//! or any lunar projection; Earth refused as DEMs are), the polygons and their checks (closed
//! rings, validity by `geo`'s `Validation`, at most a hemisphere).

use std::path::{Path, PathBuf};

use gdal::spatial_ref::{AxisMappingStrategy, CoordTransform, SpatialRef};
use gdal::vector::{Geometry, LayerAccess, OGRwkbGeometryType};
use gdal::{Dataset, DatasetOptions, GdalOpenFlags};
use geo::Validation;
use terrain::{Body, LocalFrame};

use super::sphere::{self, Ring, SphereIndex};
use super::{Area, AreaFeature, AreaSpec};

/// Why an area cannot be used, each naming the file (and the feature) and what to do.
#[derive(Debug, thiserror::Error)]
pub enum AreaError {
    #[error("cannot open {path} as a vector dataset: {reason}. Check that it exists and is a format OGR reads (GeoJSON, GeoPackage, shapefile)")]
    Open { path: PathBuf, reason: String },
    #[error("{path} has {count} layers ({names}); name one with layer = \"...\"")]
    WhichLayer {
        path: PathBuf,
        count: usize,
        names: String,
    },
    #[error("{path} has no layer \"{layer}\" (it has: {names})")]
    NoLayer {
        path: PathBuf,
        layer: String,
        names: String,
    },
    #[error("{path}: the attribute filter \"{filter}\" was refused: {reason}")]
    BadFilter {
        path: PathBuf,
        filter: String,
        reason: String,
    },
    #[error("{path}: the CRS is on an Earth ellipsoid (semi-major axis {semi_major_m} m) but the file is used as a lunar area; it is probably mislabelled. Assign a lunar CRS, e.g. `ogr2ogr -a_srs IAU_2015:30100 fixed.gpkg {path}`")]
    EarthCrs { path: PathBuf, semi_major_m: f64 },
    #[error("{path}: the CRS is on the {body} (semi-major axis {semi_major_m} m), not the Moon")]
    OtherBody {
        path: PathBuf,
        body: &'static str,
        semi_major_m: f64,
    },
    #[error("{path}: cannot convert the CRS to lunar lon/lat: {reason}")]
    Crs { path: PathBuf, reason: String },
    #[error("{path} feature {feature}: {reason}")]
    Feature {
        path: PathBuf,
        feature: u64,
        reason: String,
    },
    #[error("{path}: no polygon features{}", filter.as_ref().map(|f| format!(" pass the filter \"{f}\"")).unwrap_or_default())]
    Empty {
        path: PathBuf,
        filter: Option<String>,
    },
}

/// Farthest a vertex may lie from its ring's centre: a ring encloses the smaller of the two
/// regions it cuts the sphere into, which needs it to stay within a hemisphere.
const MAX_RING_RADIUS_DEG: f64 = 89.0;

pub(super) fn load(spec: &AreaSpec, base: Option<&Path>) -> Result<Area, AreaError> {
    let path = spec.resolve(base);
    let ds = Dataset::open_ex(
        &path,
        DatasetOptions {
            open_flags: GdalOpenFlags::GDAL_OF_VECTOR,
            ..Default::default()
        },
    )
    .map_err(|e| AreaError::Open {
        path: path.clone(),
        reason: e.to_string(),
    })?;
    let mut layer = pick_layer(&ds, spec, &path)?;
    if let Some(filter) = &spec.filter {
        layer
            .set_attribute_filter(filter)
            .map_err(|e| AreaError::BadFilter {
                path: path.clone(),
                filter: filter.clone(),
                reason: e.to_string(),
            })?;
    }
    let to_lonlat = LonLat::for_layer(layer.spatial_ref(), &ds, &path)?;
    let stem = path
        .file_name()
        .map_or_else(|| spec.file.clone(), |n| n.to_string_lossy().into_owned());
    let mut features = Vec::new();
    let mut rings: Vec<(u32, Ring)> = Vec::new();
    for (position, f) in layer.features().enumerate() {
        let id = f.fid().unwrap_or(position as u64);
        let bad = |reason: String| AreaError::Feature {
            path: path.clone(),
            feature: id,
            reason,
        };
        let geometry = f.geometry().ok_or_else(|| bad("has no geometry".into()))?;
        let polygons = polygons(geometry, &to_lonlat).map_err(bad)?;
        for poly in &polygons {
            check_polygon(poly).map_err(bad)?;
            for (k, r) in poly.iter().enumerate() {
                rings.push((
                    features.len() as u32,
                    sphere::orient_ring(&r[..r.len() - 1], k > 0),
                ));
            }
        }
        let name = name_field(&f);
        features.push(AreaFeature {
            label: name.unwrap_or_else(|| format!("{stem} #{id}")),
            polygons,
        });
    }
    if features.is_empty() {
        return Err(AreaError::Empty {
            path,
            filter: spec.filter.clone(),
        });
    }
    Ok(Area {
        spec: spec.clone(),
        sha256: file_sha256(&path),
        path,
        features,
        index: SphereIndex::new(rings),
    })
}

fn layer_names(ds: &Dataset) -> String {
    ds.layers().map(|l| l.name()).collect::<Vec<_>>().join(", ")
}

fn pick_layer<'a>(
    ds: &'a Dataset,
    spec: &AreaSpec,
    path: &Path,
) -> Result<gdal::vector::Layer<'a>, AreaError> {
    match &spec.layer {
        Some(name) => ds.layer_by_name(name).map_err(|_| AreaError::NoLayer {
            path: path.to_path_buf(),
            layer: name.clone(),
            names: layer_names(ds),
        }),
        None if ds.layer_count() == 1 => ds.layer(0).map_err(|e| AreaError::Open {
            path: path.to_path_buf(),
            reason: e.to_string(),
        }),
        None => Err(AreaError::WhichLayer {
            path: path.to_path_buf(),
            count: ds.layer_count(),
            names: layer_names(ds),
        }),
    }
}

/// A feature's `name` attribute (any letter case), when it has a non-empty one.
fn name_field(f: &gdal::vector::Feature<'_>) -> Option<String> {
    ["name", "Name", "NAME"]
        .iter()
        .find_map(|k| f.field_index(k).ok())
        .and_then(|i| f.field_as_string(i).ok().flatten())
        .map(|s| s.trim().to_string())
        .filter(|s| !s.is_empty())
}

/// SHA-256 of a plain file's bytes, hex; "" for names that are not plain files.
fn file_sha256(path: &Path) -> String {
    use sha2::{Digest, Sha256};
    match std::fs::read(path) {
        Ok(bytes) => Sha256::digest(&bytes)
            .iter()
            .map(|b| format!("{b:02x}"))
            .collect(),
        Err(_) => String::new(),
    }
}

/// How a layer's coordinates become lunar (lon, lat) degrees.
enum LonLat {
    /// Already lon/lat (x = longitude).
    Geographic,
    /// A lunar projection, undone by OGR.
    Projected(CoordTransform),
}

impl LonLat {
    fn for_layer(srs: Option<SpatialRef>, ds: &Dataset, path: &Path) -> Result<LonLat, AreaError> {
        let Some(mut srs) = srs else {
            return Ok(LonLat::Geographic);
        };
        let semi_major = srs.semi_major().unwrap_or(terrain::MOON_RADIUS_M);
        match Body::from_radius_m(semi_major) {
            Body::Moon => {}
            // RFC 7946 GeoJSON has no CRS member and GDAL reports WGS 84 for it; coordinates
            // written for the Moon that way are lunar lon/lat. A file that names a CRS is
            // taken at its word.
            Body::Earth if ds.driver().short_name() == "GeoJSON" && !names_a_crs(path) => {
                return Ok(LonLat::Geographic)
            }
            Body::Earth => {
                return Err(AreaError::EarthCrs {
                    path: path.to_path_buf(),
                    semi_major_m: semi_major,
                })
            }
            other => {
                return Err(AreaError::OtherBody {
                    path: path.to_path_buf(),
                    body: other.name(),
                    semi_major_m: semi_major,
                })
            }
        }
        if srs.is_geographic() {
            return Ok(LonLat::Geographic);
        }
        let crs_err = |e: gdal::errors::GdalError| AreaError::Crs {
            path: path.to_path_buf(),
            reason: e.to_string(),
        };
        let mut geog = srs.geog_cs().map_err(crs_err)?;
        srs.set_axis_mapping_strategy(AxisMappingStrategy::TraditionalGisOrder);
        geog.set_axis_mapping_strategy(AxisMappingStrategy::TraditionalGisOrder);
        Ok(LonLat::Projected(
            CoordTransform::new(&srs, &geog).map_err(crs_err)?,
        ))
    }

    fn apply(&self, pts: &[(f64, f64, f64)]) -> Result<Vec<(f64, f64)>, String> {
        match self {
            LonLat::Geographic => Ok(pts.iter().map(|p| (p.0, p.1)).collect()),
            LonLat::Projected(t) => {
                let mut x: Vec<f64> = pts.iter().map(|p| p.0).collect();
                let mut y: Vec<f64> = pts.iter().map(|p| p.1).collect();
                let mut z = vec![0.0; pts.len()];
                t.transform_coords(&mut x, &mut y, &mut z)
                    .map_err(|e| format!("a vertex cannot be converted to lon/lat: {e}"))?;
                Ok(x.into_iter().zip(y).collect())
            }
        }
    }
}

/// Whether a GeoJSON file carries a (2008-style) "crs" member.
fn names_a_crs(path: &Path) -> bool {
    #[derive(serde::Deserialize)]
    struct Top {
        crs: Option<serde_json::Value>,
    }
    std::fs::read(path)
        .ok()
        .and_then(|b| serde_json::from_slice::<Top>(&b).ok())
        .is_some_and(|t| t.crs.is_some())
}

type Polygon = Vec<Vec<(f64, f64)>>;

/// The polygons of a Polygon or MultiPolygon geometry, rings closed, in lon/lat; open rings
/// and other geometry types refused.
fn polygons(g: &Geometry, to_lonlat: &LonLat) -> Result<Vec<Polygon>, String> {
    let polygon = |p: &Geometry| -> Result<Polygon, String> {
        (0..p.geometry_count())
            .map(|k| {
                let mut pts = Vec::new();
                p.get_geometry(k).get_points(&mut pts);
                ring_points(&pts, k, to_lonlat)
            })
            .collect()
    };
    match gdal::vector::geometry_type_flatten(g.geometry_type()) {
        OGRwkbGeometryType::wkbPolygon => Ok(vec![polygon(g)?]),
        OGRwkbGeometryType::wkbMultiPolygon => (0..g.geometry_count())
            .map(|i| polygon(&g.get_geometry(i)))
            .collect(),
        _ => Err(format!(
            "is a {}, not a polygon or multipolygon",
            g.geometry_name()
        )),
    }
}

fn ring_points(
    pts: &[(f64, f64, f64)],
    k: usize,
    to_lonlat: &LonLat,
) -> Result<Vec<(f64, f64)>, String> {
    let which = if k == 0 {
        "the outer ring".to_string()
    } else {
        format!("hole {k}")
    };
    if pts.len() < 4 {
        return Err(format!(
            "{which} has {} points; a closed ring needs at least 4 (3 corners and the first repeated)",
            pts.len()
        ));
    }
    let (first, last) = (pts[0], pts[pts.len() - 1]);
    if (first.0, first.1) != (last.0, last.1) {
        return Err(format!(
            "{which} is open: it ends at ({}, {}), not where it starts ({}, {})",
            last.0, last.1, first.0, first.1
        ));
    }
    let out = to_lonlat.apply(pts)?;
    if out
        .iter()
        .any(|p| !(p.0.is_finite() && p.1.is_finite() && p.1.abs() <= 90.0))
    {
        return Err(format!("{which} has a vertex that is not a finite lon/lat"));
    }
    Ok(out)
}

/// A polygon is valid on the sphere when, in an azimuthal equidistant frame centred on it, its
/// rings with their arcs densified pass `geo`'s validity rules (no self-intersection, holes
/// inside the outer ring and not crossing it), and it lies within a hemisphere.
fn check_polygon(poly: &Polygon) -> Result<(), String> {
    let outer = &poly[0];
    let units: Vec<_> = outer
        .iter()
        .map(|&(lon, lat)| sphere::unit(lon, lat))
        .collect();
    let (lon0, lat0) = sphere::centre_of(&units);
    let centre = sphere::unit(lon0, lat0);
    if let Some(far) = poly
        .iter()
        .flatten()
        .map(|&(lon, lat)| sphere::angle(centre, sphere::unit(lon, lat)).to_degrees())
        .find(|a| *a > MAX_RING_RADIUS_DEG)
    {
        return Err(format!(
            "reaches {far:.0}° from its centre; an area must lie within a hemisphere"
        ));
    }
    let frame = LocalFrame::new(1.0, lon0, lat0);
    let ring = |r: &Vec<(f64, f64)>, hole: bool| {
        let oriented = sphere::orient_ring(&r[..r.len() - 1], hole);
        sphere::planar(&frame, &sphere::densified(&oriented))
    };
    let shape = geo::Polygon::new(
        ring(outer, false),
        poly[1..].iter().map(|h| ring(h, true)).collect(),
    );
    shape
        .check_validation()
        .map_err(|e| format!("is not a valid polygon: {e}"))
}

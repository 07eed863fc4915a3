//! [`Criteria`] to canonical TOML text: fixed key order and float formatting, so the same
//! criteria always give the same text (it goes into export provenance and study files).

use std::fmt::Write;

use super::{Criteria, Shape, UtilityShape, WeightSampling, CRITERIA_FORMAT, CRITERIA_VERSION};

/// Shortest text that reads back to the same f64; always carries a '.' or exponent so TOML
/// reads it as a float.
pub(crate) fn float(v: f64) -> String {
    let s = format!("{v:?}");
    if s.contains(['.', 'e', 'E', 'n', 'i']) {
        s
    } else {
        format!("{s}.0")
    }
}

pub(crate) fn quoted(s: &str) -> String {
    let mut out = String::with_capacity(s.len() + 2);
    out.push('"');
    for ch in s.chars() {
        match ch {
            '"' => out.push_str("\\\""),
            '\\' => out.push_str("\\\\"),
            '\n' => out.push_str("\\n"),
            '\t' => out.push_str("\\t"),
            '\r' => out.push_str("\\r"),
            c if (c as u32) < 0x20 || c as u32 == 0x7f => {
                let _ = write!(out, "\\u{:04X}", c as u32);
            }
            c => out.push(c),
        }
    }
    out.push('"');
    out
}

pub(crate) fn to_toml(c: &Criteria) -> String {
    let mut t = String::new();
    let _ = writeln!(t, "format = {}", quoted(CRITERIA_FORMAT));
    let _ = writeln!(t, "version = {CRITERIA_VERSION}");
    let _ = writeln!(t, "title = {}", quoted(&c.title));
    let _ = writeln!(t, "scoring = {}", quoted(c.scoring.key()));
    let r = &c.robustness;
    let _ = writeln!(t, "\n[robustness]");
    let _ = writeln!(
        t,
        "samples = {}\nseed = {}\ntop_n = {}\npool = {}",
        r.samples, r.seed, r.top_n, r.pool
    );
    match r.sampling {
        WeightSampling::AroundChosen { spread } => {
            let _ = writeln!(t, "weights = \"around_chosen\"\nspread = {}", float(spread));
        }
        WeightSampling::UniformSimplex => {
            let _ = writeln!(t, "weights = \"uniform_simplex\"");
        }
    }
    if let Some(s) = &c.structure {
        let _ = writeln!(
            t,
            "\n[structure]\naperture_diameter_m = {}",
            float(s.aperture_m)
        );
        let _ = match s.shape {
            Shape::Paraboloid { focal_length_m } => {
                writeln!(
                    t,
                    "shape = \"paraboloid\"\nfocal_length_m = {}",
                    float(focal_length_m)
                )
            }
            Shape::ParaboloidRatio { f_over_d } => {
                writeln!(t, "shape = \"paraboloid\"\nf_over_d = {}", float(f_over_d))
            }
            Shape::SphericalCap { radius_m } => writeln!(
                t,
                "shape = \"spherical_cap\"\ncap_radius_m = {}",
                float(radius_m)
            ),
        };
        let _ = writeln!(t, "anchor_count = {}", s.anchors);
        let _ = writeln!(t, "min_clearance_m = {}", float(s.min_clearance_m));
        let _ = writeln!(
            t,
            "max_anchor_height_difference_m = {}",
            float(s.max_anchor_height_difference_m)
        );
    }
    if let Some(o) = &c.operations {
        // Plain keys and numbers: the serializer's text is canonical already.
        let body = toml::to_string(o).unwrap_or_default();
        let _ = write!(t, "\n[operations]\n{body}");
    }
    if c.backup_radius_km != super::DEFAULT_BACKUP_RADIUS_KM {
        let _ = writeln!(
            t,
            "\n[neighbourhood]\nbackup_radius_km = {}",
            float(c.backup_radius_km)
        );
    }
    for a in &c.areas {
        let _ = writeln!(t, "\n[[area]]\nfile = {}", quoted(&a.file));
        if let Some(l) = &a.layer {
            let _ = writeln!(t, "layer = {}", quoted(l));
        }
        if let Some(f) = &a.filter {
            let _ = writeln!(t, "filter = {}", quoted(f));
        }
        let _ = writeln!(
            t,
            "keep = {}\nmargin_km = {}\nwhy = {}",
            quoted(a.keep.key()),
            float(a.margin_km),
            quoted(&a.why)
        );
    }
    for q in &c.requirements {
        let _ = writeln!(t, "\n[[requirement]]\nmetric = {}", quoted(&q.metric));
        if let Some(v) = q.min {
            let _ = writeln!(t, "min = {}", float(v));
        }
        if let Some(v) = q.max {
            let _ = writeln!(t, "max = {}", float(v));
        }
        let _ = writeln!(t, "why = {}", quoted(&q.why));
    }
    for s in &c.criteria {
        let _ = writeln!(t, "\n[[criterion]]\nmetric = {}", quoted(&s.metric));
        let _ = writeln!(
            t,
            "worst = {}\nideal = {}\nweight = {}",
            float(s.worst),
            float(s.ideal),
            float(s.weight)
        );
        match &s.shape {
            UtilityShape::Linear => {
                let _ = writeln!(t, "shape = \"linear\"");
            }
            UtilityShape::Breakpoints { points } => {
                let list: Vec<String> = points
                    .iter()
                    .map(|p| format!("[{}, {}]", float(p[0]), float(p[1])))
                    .collect();
                let _ = writeln!(t, "shape = \"breakpoints\"\npoints = [{}]", list.join(", "));
            }
        }
        let _ = writeln!(t, "why = {}", quoted(&s.why));
    }
    t
}

//! The operations figures as text, for the `site` command and other plain reports.

use crate::{OperationsInputs, OperationsReport};
use std::fmt::Write;

fn pct(v: f64) -> String {
    format!("{:.1} %", 100.0 * v)
}

impl OperationsReport {
    /// A plain-text section: landing, anchor shots, relay and night, with the inputs they
    /// used.
    pub fn to_text(&self, inputs: &OperationsInputs) -> String {
        let mut s = String::new();
        let _ = writeln!(s, "\nOperations from the floor (docs/operations.md):");
        let _ = writeln!(
            s,
            "  lander at lon {:.5} deg, lat {:.5} deg",
            self.lander_lon_deg, self.lander_lat_deg
        );
        match &self.landing {
            Some(l) => {
                let _ = writeln!(
                    s,
                    "  landing: {} safe at the aim point, best aim point {} safe {:.0} m from it; {} of the floor safe",
                    pct(l.p_aim),
                    pct(l.p_best),
                    l.best_to_aim_m,
                    pct(l.safe_fraction)
                );
                let _ = writeln!(
                    s,
                    "    dispersion {:.0} m (3 sigma), slope limit {:.0} deg, roughness limit {:.1} m; slope at the {:.0} m post spacing cannot see rocks smaller than a post",
                    inputs.landing_dispersion_3sigma_m,
                    inputs.landing_max_slope_deg,
                    inputs.landing_max_roughness_m,
                    l.post_m
                );
            }
            None => {
                let _ = writeln!(s, "  landing: the floor could not be placed on the DEM");
            }
        }
        match &self.shots {
            Some(sh) => {
                let _ = writeln!(
                    s,
                    "  anchor shots: longest {:.0} m (launcher {:.0} m), lowest clearance {} (needs {:.1} m); {}; anchor {} binds",
                    sh.longest_range_m,
                    inputs.launcher_range_m,
                    sh.lowest_clearance_m
                        .map_or("unknown (ground missing)".to_string(), |c| format!("{c:.1} m")),
                    inputs.shot_min_clearance_m,
                    if sh.all_reachable { "every anchor reachable" } else { "NOT every anchor reachable" },
                    sh.binding_anchor
                );
                let _ = writeln!(
                    s,
                    "    anchor   range m   elev deg   clearance m   reachable"
                );
                for (i, t) in sh.shots.iter().enumerate() {
                    let _ = writeln!(
                        s,
                        "    {:>6}   {:>7.0}   {:>8.2}   {:>11}   {}",
                        i + 1,
                        t.range_m,
                        t.elevation_deg,
                        t.clearance_m.map_or("–".to_string(), |c| format!("{c:.1}")),
                        if t.reachable { "yes" } else { "no" }
                    );
                }
            }
            None => {
                let _ = writeln!(s, "  anchor shots: no anchors (no structure placed here)");
            }
        }
        let r = &self.relay.lander;
        let _ = writeln!(
            s,
            "  relay near L2 (margin {:.1} deg): in view {} of the time at the lander, longest outage {:.1} h, lowest {:.2} deg above skyline+margin at azimuth {:.1} deg",
            inputs.relay_margin_deg,
            pct(r.fraction),
            r.longest_gap_h,
            r.worst_margin_deg,
            r.worst_azimuth_deg
        );
        for (what, k) in [
            ("best", self.relay.best_anchor),
            ("worst", self.relay.worst_anchor),
        ] {
            if let Some(a) = k.checked_sub(1).and_then(|i| self.relay.anchors.get(i)) {
                let _ = writeln!(
                    s,
                    "    {what} anchor {k}: in view {}, longest outage {:.1} h",
                    pct(a.fraction),
                    a.longest_gap_h
                );
            }
        }
        let n = &self.night.lander;
        let _ = writeln!(
            s,
            "  night at the lander: dark {} of the time, longest darkness {:.0} h, {:.0} sunlit hours per synodic month",
            pct(n.dark_fraction),
            n.longest_dark_h,
            n.sunlit_h_per_month
        );
        if let Some(rn) = self.rim_night() {
            let _ = writeln!(
                s,
                "    best-lit anchor {}: dark {}, longest darkness {:.0} h, {:.0} sunlit hours per month",
                self.night.best_lit_anchor,
                pct(rn.dark_fraction),
                rn.longest_dark_h,
                rn.sunlit_h_per_month
            );
        }
        s
    }
}

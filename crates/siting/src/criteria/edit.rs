//! Edits of a soft criterion's utility curve that always leave it valid: what a GUI calls when
//! a user drags an end or a breakpoint. Moving `worst` or `ideal` moves the breakpoint that
//! carries it, so the rule "worst is a breakpoint with utility 0, ideal one with utility 1"
//! can never be broken by an edit; breakpoints stay strictly increasing by being held between
//! their neighbours.

use super::{SoftCriterion, UtilityShape};

/// Which end of a utility curve.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum CurveEnd {
    /// Utility 0.
    Worst,
    /// Utility 1.
    Ideal,
}

impl CurveEnd {
    fn utility(self) -> f64 {
        match self {
            CurveEnd::Worst => 0.0,
            CurveEnd::Ideal => 1.0,
        }
    }
}

/// The role of a point of the curve as [`SoftCriterion::curve_points`] lists it.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum PointRole {
    End(CurveEnd),
    /// A breakpoint between or beyond the ends: value and utility both free.
    Free,
}

/// The next `f64` above (`up`) or below a finite `x` (`f64::next_up`/`next_down` need Rust
/// 1.86; the workspace builds with 1.85).
fn next_float(x: f64, up: bool) -> f64 {
    if x == 0.0 {
        let tiny = f64::from_bits(1);
        return if up { tiny } else { -tiny };
    }
    let bits = x.to_bits();
    let away_from_zero = (x > 0.0) == up;
    f64::from_bits(if away_from_zero { bits + 1 } else { bits - 1 })
}

/// `x` held strictly between the values of the neighbours of point `k`.
fn between_neighbours(points: &[[f64; 2]], k: usize, x: f64) -> f64 {
    let mut x = x;
    if let Some(next) = points.get(k + 1) {
        x = x.min(next_float(next[0], false));
    }
    if let Some(prev) = k.checked_sub(1).and_then(|j| points.get(j)) {
        x = x.max(next_float(prev[0], true));
    }
    x
}

impl SoftCriterion {
    /// The value at one end.
    pub fn end(&self, end: CurveEnd) -> f64 {
        match end {
            CurveEnd::Worst => self.worst,
            CurveEnd::Ideal => self.ideal,
        }
    }

    /// The curve as (value, utility) points ascending in value: the breakpoints, or for a
    /// straight criterion its two ends.
    pub fn curve_points(&self) -> Vec<[f64; 2]> {
        match &self.shape {
            UtilityShape::Breakpoints { points } => points.clone(),
            UtilityShape::Linear => {
                let mut p = vec![[self.worst, 0.0], [self.ideal, 1.0]];
                p.sort_by(|a, b| a[0].total_cmp(&b[0]));
                p
            }
        }
    }

    /// What point `k` of [`SoftCriterion::curve_points`] stands for.
    pub fn point_role(&self, k: usize) -> PointRole {
        let points = self.curve_points();
        let Some(p) = points.get(k) else {
            return PointRole::Free;
        };
        for end in [CurveEnd::Worst, CurveEnd::Ideal] {
            if p[0] == self.end(end) && p[1] == end.utility() {
                return PointRole::End(end);
            }
        }
        PointRole::Free
    }

    /// Move one end of the curve to `value` (held strictly between the neighbouring
    /// breakpoints, and never onto the other end). Returns whether anything changed.
    ///
    /// A breakpoint curve whose end is not among its points (a file that `validate` would
    /// refuse) gets the point added, so the edit also repairs it.
    pub fn set_end(&mut self, end: CurveEnd, value: f64) -> bool {
        let other = match end {
            CurveEnd::Worst => self.ideal,
            CurveEnd::Ideal => self.worst,
        };
        if !value.is_finite() || value == other {
            return false;
        }
        let current = self.end(end);
        let mut repaired = false;
        let moved_to = match &mut self.shape {
            UtilityShape::Linear => value,
            UtilityShape::Breakpoints { points } => {
                let anchor = points
                    .iter()
                    .position(|p| p[0] == current && p[1] == end.utility());
                match anchor {
                    Some(k) => {
                        let x = between_neighbours(points, k, value);
                        points[k][0] = x;
                        x
                    }
                    None => {
                        let k = points.partition_point(|p| p[0] < value);
                        if points.get(k).is_some_and(|p| p[0] == value) {
                            points[k][1] = end.utility();
                        } else {
                            points.insert(k, [value, end.utility()]);
                        }
                        repaired = true;
                        value
                    }
                }
            }
        };
        match end {
            CurveEnd::Worst => self.worst = moved_to,
            CurveEnd::Ideal => self.ideal = moved_to,
        }
        repaired || moved_to != current
    }

    /// Move point `k` of [`SoftCriterion::curve_points`] to (`value`, `utility`). An end keeps
    /// its utility and carries `worst` or `ideal` with it; a free breakpoint takes both, held
    /// between its neighbours and within [0, 1]. Returns whether anything changed.
    pub fn move_point(&mut self, k: usize, value: f64, utility: f64) -> bool {
        if !value.is_finite() || !utility.is_finite() {
            return false;
        }
        match self.point_role(k) {
            PointRole::End(end) => self.set_end(end, value),
            PointRole::Free => {
                let UtilityShape::Breakpoints { points } = &mut self.shape else {
                    return false;
                };
                let Some(old) = points.get(k).copied() else {
                    return false;
                };
                let x = between_neighbours(points, k, value);
                points[k] = [x, utility.clamp(0.0, 1.0)];
                points[k] != old
            }
        }
    }

    /// Add a breakpoint at `value` on the curve as it is (so the ranking does not change
    /// until it is moved); a straight criterion becomes a breakpoint one. Returns the new
    /// point's index, or `None` when a point already sits at `value`.
    pub fn insert_point(&mut self, value: f64) -> Option<usize> {
        if !value.is_finite() {
            return None;
        }
        let utility = crate::utility::utility(self, Some(value));
        let mut points = self.curve_points();
        let k = points.partition_point(|p| p[0] < value);
        if points.get(k).is_some_and(|p| p[0] == value) {
            return None;
        }
        points.insert(k, [value, utility]);
        self.shape = UtilityShape::Breakpoints { points };
        Some(k)
    }

    /// Remove a free breakpoint (the ends stay). Returns whether one was removed.
    pub fn remove_point(&mut self, k: usize) -> bool {
        if self.point_role(k) != PointRole::Free {
            return false;
        }
        match &mut self.shape {
            UtilityShape::Breakpoints { points } if k < points.len() && points.len() > 2 => {
                points.remove(k);
                true
            }
            _ => false,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::criteria::Criteria;
    use crate::utility::utility;

    #[test]
    fn next_float_steps_one_unit_in_the_last_place() {
        // IEEE 754 neighbours, written out: 1 + 2^-52 above 1, 1 - 2^-53 below it.
        assert_eq!(next_float(1.0, true), 1.0 + f64::EPSILON);
        assert_eq!(next_float(1.0, false), 1.0 - f64::EPSILON / 2.0);
        assert_eq!(next_float(-1.0, false), -1.0 - f64::EPSILON);
        assert_eq!(next_float(-1.0, true), -1.0 + f64::EPSILON / 2.0);
        assert_eq!(next_float(0.0, true), f64::from_bits(1));
        assert!(next_float(0.0, false) < 0.0);
    }

    fn shipped(metric: &str) -> SoftCriterion {
        Criteria::default_reflector()
            .criteria
            .into_iter()
            .find(|c| c.metric == metric)
            .expect("shipped criteria carry this metric")
    }

    fn valid(c: &SoftCriterion) {
        let mut all = Criteria::default_reflector();
        all.criteria = vec![c.clone()];
        all.validate().expect("edited criterion stays valid");
    }

    #[test]
    fn moving_worst_of_a_peaked_curve_moves_its_breakpoint() {
        // The shipped d/D curve: [[0.15, 0], [0.2, 1], [0.3, 0]], worst 0.3.
        let mut c = shipped("depth_to_diameter");
        assert!(c.set_end(CurveEnd::Worst, 0.295));
        valid(&c);
        assert_eq!(c.worst, 0.295);
        assert_eq!(utility(&c, Some(0.295)), 0.0);
        assert_eq!(utility(&c, Some(0.15)), 0.0, "the other zero stays");
        assert_eq!(utility(&c, Some(0.2)), 1.0);
    }

    #[test]
    fn an_end_cannot_pass_its_neighbour() {
        let mut c = shipped("depth_to_diameter");
        c.set_end(CurveEnd::Worst, 0.1);
        valid(&c);
        assert!(c.worst > 0.2, "worst {} crossed the ideal's point", c.worst);
        let mut d = shipped("diameter_m");
        d.set_end(CurveEnd::Ideal, 5_000.0);
        valid(&d);
        assert!(d.ideal < 2_000.0);
    }

    #[test]
    fn straight_criterion_ends_move_freely_but_never_meet() {
        let mut c = shipped("floor_tilt_deg");
        assert!(c.set_end(CurveEnd::Worst, 12.0));
        assert!(!c.set_end(CurveEnd::Worst, c.ideal));
        valid(&c);
        assert_eq!(c.worst, 12.0);
    }

    #[test]
    fn dragging_any_point_keeps_the_criterion_valid() {
        let mut c = shipped("diameter_m");
        let targets = [-1e6, 0.0, 750.0, 1_199.0, 1_200.0, 1_900.0, 2_500.0, 1e9];
        for k in 0..3 {
            for &x in &targets {
                for u in [-0.5, 0.0, 0.4, 1.0, 2.0] {
                    c.move_point(k, x, u);
                    valid(&c);
                }
            }
        }
    }

    #[test]
    fn inserting_and_removing_a_point_keeps_the_curve() {
        let mut c = shipped("rim_completeness");
        let before = utility(&c, Some(0.8));
        let k = c.insert_point(0.7).expect("no point at 0.7 yet");
        valid(&c);
        assert_eq!(c.point_role(k), PointRole::Free);
        assert!((utility(&c, Some(0.8)) - before).abs() < 1e-12);
        assert!(c.move_point(k, 0.72, 0.9));
        valid(&c);
        assert!(utility(&c, Some(0.8)) > before);
        assert!(c.remove_point(k));
        valid(&c);
        assert!(!c.remove_point(0), "ends are not removed");
    }

    #[test]
    fn an_end_missing_from_the_points_is_put_back() {
        let mut c = shipped("depth_to_diameter");
        c.worst = 0.31; // as a hand-edited file might say
        assert!(c.set_end(CurveEnd::Worst, 0.31));
        valid(&c);
    }
}

//! Great circles on a sphere and a local metric frame around a point.
//!
//! Formulas: haversine distance and initial bearing (Sinnott 1984, Sky & Telescope 68:159;
//! Snyder 1987 §5), direct problem on the sphere, and the azimuthal equidistant projection
//! (Snyder 1987 §25). The tests check them against PROJ's `aeqd` and geographiclib's numbers.

/// Great-circle distance in metres between two (lon, lat) points in degrees.
pub fn distance_m(radius_m: f64, a: (f64, f64), b: (f64, f64)) -> f64 {
    central_angle_rad(a, b) * radius_m
}

/// Central angle in radians between two (lon, lat) points (haversine, stable at short range).
pub fn central_angle_rad(a: (f64, f64), b: (f64, f64)) -> f64 {
    let (l1, p1) = (a.0.to_radians(), a.1.to_radians());
    let (l2, p2) = (b.0.to_radians(), b.1.to_radians());
    let h = ((p2 - p1) / 2.0).sin().powi(2) + p1.cos() * p2.cos() * ((l2 - l1) / 2.0).sin().powi(2);
    2.0 * h.sqrt().min(1.0).asin()
}

/// Initial azimuth in degrees clockwise from north, [0, 360), from `a` towards `b`.
pub fn azimuth_deg(a: (f64, f64), b: (f64, f64)) -> f64 {
    let (l1, p1) = (a.0.to_radians(), a.1.to_radians());
    let (l2, p2) = (b.0.to_radians(), b.1.to_radians());
    let dl = l2 - l1;
    let y = dl.sin() * p2.cos();
    let x = p1.cos() * p2.sin() - p1.sin() * p2.cos() * dl.cos();
    y.atan2(x).to_degrees().rem_euclid(360.0)
}

/// The point reached by going `distance_m` from `start` along initial azimuth `azimuth_deg`.
pub fn destination(
    radius_m: f64,
    start: (f64, f64),
    azimuth_deg: f64,
    distance_m: f64,
) -> (f64, f64) {
    let p1 = start.1.to_radians();
    destination_sin_cos(
        start.0.to_radians(),
        p1.sin_cos(),
        (distance_m / radius_m).sin_cos(),
        azimuth_deg.to_radians().sin_cos(),
    )
}

/// [`destination`] from the start's longitude in radians and the sines and cosines of its
/// latitude, of the central angle travelled and of the azimuth: for callers stepping along
/// one azimuth from one point, who work those out once. The same point to the bit.
pub fn destination_sin_cos(
    lon1_rad: f64,
    (sp1, cp1): (f64, f64),
    (sd, cd): (f64, f64),
    (saz, caz): (f64, f64),
) -> (f64, f64) {
    let p2 = (sp1 * cd + cp1 * sd * caz).clamp(-1.0, 1.0).asin();
    let l2 = lon1_rad + (saz * sd * cp1).atan2(cd - sp1 * p2.sin());
    (
        crate::projection::wrap_deg_180(l2.to_degrees()),
        p2.to_degrees(),
    )
}

/// A local azimuthal equidistant frame (x east, y north, metres) centred on a point: distances
/// and azimuths from the centre are true, which is what crater measurement needs.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct LocalFrame {
    pub centre_lon_deg: f64,
    pub centre_lat_deg: f64,
    pub radius_m: f64,
    sin_p0: f64,
    cos_p0: f64,
    /// Unit vectors of the centre and of east and north there (body-fixed x, y, z).
    centre: [f64; 3],
    east: [f64; 3],
    north: [f64; 3],
}

impl LocalFrame {
    pub fn new(radius_m: f64, centre_lon_deg: f64, centre_lat_deg: f64) -> Self {
        let p0 = centre_lat_deg.to_radians();
        let (sin_p0, cos_p0) = p0.sin_cos();
        let (sin_l0, cos_l0) = centre_lon_deg.to_radians().sin_cos();
        LocalFrame {
            centre_lon_deg,
            centre_lat_deg,
            radius_m,
            sin_p0,
            cos_p0,
            centre: [cos_p0 * cos_l0, cos_p0 * sin_l0, sin_p0],
            east: [-sin_l0, cos_l0, 0.0],
            north: [-sin_p0 * cos_l0, -sin_p0 * sin_l0, cos_p0],
        }
    }

    /// A point given as a unit vector (x towards 0 E 0 N, y towards 90 E 0 N, z north) to
    /// local x/y (metres): the same projection as [`LocalFrame::to_local`] in vector form
    /// (x = R k cos(lat) sin(dlon), y = R k (cos(lat0) sin(lat) - sin(lat0) cos(lat) cos(dlon)),
    /// k = c / sin c, Snyder 1987 eq. 25-2 to 25-4), without the trigonometry of lon/lat.
    pub fn to_local_unit(&self, v: [f64; 3]) -> (f64, f64) {
        let dot = |a: [f64; 3]| a[0] * v[0] + a[1] * v[1] + a[2] * v[2];
        let (cosc, x, y) = (dot(self.centre), dot(self.east), dot(self.north));
        let sinc = x.hypot(y);
        let c = sinc.atan2(cosc);
        let k = if sinc < 1e-12 { 1.0 } else { c / sinc };
        (self.radius_m * k * x, self.radius_m * k * y)
    }

    /// Lon/lat (degrees) to local x/y (metres).
    pub fn to_local(&self, lon_deg: f64, lat_deg: f64) -> (f64, f64) {
        let p = lat_deg.to_radians();
        let dl = (lon_deg - self.centre_lon_deg).to_radians();
        let cosc = (self.sin_p0 * p.sin() + self.cos_p0 * p.cos() * dl.cos()).clamp(-1.0, 1.0);
        let c = cosc.acos();
        let k = if c < 1e-12 { 1.0 } else { c / c.sin() };
        let x = self.radius_m * k * p.cos() * dl.sin();
        let y = self.radius_m * k * (self.cos_p0 * p.sin() - self.sin_p0 * p.cos() * dl.cos());
        (x, y)
    }

    /// Local x/y (metres) to lon/lat (degrees, lon in [-180, 180)).
    pub fn to_lonlat(&self, x: f64, y: f64) -> (f64, f64) {
        let rho = x.hypot(y);
        if rho < 1e-9 {
            return (
                crate::projection::wrap_deg_180(self.centre_lon_deg),
                self.centre_lat_deg,
            );
        }
        let c = rho / self.radius_m;
        let (sc, cc) = c.sin_cos();
        let lat = (cc * self.sin_p0 + y * sc * self.cos_p0 / rho)
            .clamp(-1.0, 1.0)
            .asin();
        let lon = self.centre_lon_deg.to_radians()
            + (x * sc).atan2(rho * self.cos_p0 * cc - y * self.sin_p0 * sc);
        (
            crate::projection::wrap_deg_180(lon.to_degrees()),
            lat.to_degrees(),
        )
    }
}

#[cfg(test)]
mod tests {
    use super::LocalFrame;

    #[test]
    fn the_vector_form_gives_the_lon_lat_form() {
        for (lon0, lat0) in [(0.0, 0.0), (180.0, 16.0), (-120.0, -89.5), (33.0, 60.0)] {
            let f = LocalFrame::new(1_737_400.0, lon0, lat0);
            for (lon, lat) in [
                (lon0 + 1.0, lat0),
                (lon0 - 40.0, 10.0),
                (179.9, -89.0),
                (lon0, lat0),
            ] {
                let (l, p) = (f64::to_radians(lon), f64::to_radians(lat));
                let v = [p.cos() * l.cos(), p.cos() * l.sin(), p.sin()];
                let (a, b) = (f.to_local(lon, lat), f.to_local_unit(v));
                assert!(
                    (a.0 - b.0).abs() < 1e-6 && (a.1 - b.1).abs() < 1e-6,
                    "{a:?} {b:?}"
                );
            }
        }
    }
}

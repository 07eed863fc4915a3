//! Topographic diffusion of an axisymmetric crater profile, dz/dt = kappa laplacian(z)
//! (Fassett and Thomson 2014, "Crater degradation on the lunar maria: topographic diffusion
//! and the rate of erosion on the Moon", JGR Planets 119:2255-2271), solved in 1-D radial
//! form: dz/dtau = (1/rho) d/drho (rho dz/drho) with rho = r/R and tau = kappa t / R^2.
//!
//! Implicit on purpose: an explicit step would need thousands of steps on a fine radial grid,
//! while Crank-Nicolson after two backward-Euler half steps (Rannacher 1984, Numer. Math.
//! 43:309-327, which damps the oscillation a kinked rim would otherwise excite) is accurate in
//! a few dozen.

/// Crank-Nicolson steps taken (after the two backward-Euler half steps).
const CN_STEPS: usize = 48;

/// Diffuse `z` (heights at rho = i * step_rho, i = 0..n) for dimensionless time `tau`. The
/// outer node is held at zero height (the undisturbed surface); rho = 0 is a symmetry axis.
pub fn diffuse_radial(z: &mut [f64], step_rho: f64, tau: f64) {
    if tau <= 0.0 || z.len() < 3 {
        return;
    }
    let lap = Laplacian::new(z.len(), step_rho);
    let mut work = Work::new(z.len());
    let dt = tau / (CN_STEPS as f64 + 1.0);
    step(z, &lap, &mut work, dt * 0.5, 1.0);
    step(z, &lap, &mut work, dt * 0.5, 1.0);
    for _ in 0..CN_STEPS {
        step(z, &lap, &mut work, dt, 0.5);
    }
}

/// The finite-volume axisymmetric Laplacian as a tridiagonal matrix: row i is
/// lower[i] z[i-1] + diag[i] z[i] + upper[i] z[i+1].
struct Laplacian {
    lower: Vec<f64>,
    diag: Vec<f64>,
    upper: Vec<f64>,
}

impl Laplacian {
    fn new(n: usize, h: f64) -> Laplacian {
        let (mut lower, mut diag, mut upper) = (vec![0.0; n], vec![0.0; n], vec![0.0; n]);
        let h2 = h * h;
        // Axis: by symmetry the 2-D Laplacian at the centre is 4 (z1 - z0) / h^2.
        diag[0] = -4.0 / h2;
        upper[0] = 4.0 / h2;
        for i in 1..n - 1 {
            let rho = i as f64 * h;
            let (rm, rp) = (rho - 0.5 * h, rho + 0.5 * h);
            lower[i] = rm / (rho * h2);
            upper[i] = rp / (rho * h2);
            diag[i] = -(rm + rp) / (rho * h2);
        }
        // Outer node fixed (Dirichlet): its row stays zero.
        Laplacian { lower, diag, upper }
    }
}

/// Scratch vectors reused across steps.
struct Work {
    a: Vec<f64>,
    b: Vec<f64>,
    c: Vec<f64>,
    rhs: Vec<f64>,
    cp: Vec<f64>,
}

impl Work {
    fn new(n: usize) -> Work {
        Work {
            a: vec![0.0; n],
            b: vec![0.0; n],
            c: vec![0.0; n],
            rhs: vec![0.0; n],
            cp: vec![0.0; n],
        }
    }
}

/// One theta-scheme step: (I - theta dt L) z' = (I + (1 - theta) dt L) z.
fn step(z: &mut [f64], lap: &Laplacian, w: &mut Work, dt: f64, theta: f64) {
    let n = z.len();
    for i in 0..n {
        let lz = lap.lower[i] * if i > 0 { z[i - 1] } else { 0.0 }
            + lap.diag[i] * z[i]
            + lap.upper[i] * if i + 1 < n { z[i + 1] } else { 0.0 };
        w.rhs[i] = z[i] + (1.0 - theta) * dt * lz;
        w.a[i] = -theta * dt * lap.lower[i];
        w.b[i] = 1.0 - theta * dt * lap.diag[i];
        w.c[i] = -theta * dt * lap.upper[i];
    }
    solve_tridiagonal(&w.a, &w.b, &w.c, &mut w.rhs, &mut w.cp);
    z.copy_from_slice(&w.rhs);
}

/// Thomas algorithm; the system is diagonally dominant so no pivoting is needed.
fn solve_tridiagonal(a: &[f64], b: &[f64], c: &[f64], d: &mut [f64], cp: &mut [f64]) {
    let n = d.len();
    let mut denom = b[0];
    cp[0] = c[0] / denom;
    d[0] /= denom;
    for i in 1..n {
        denom = b[i] - a[i] * cp[i - 1];
        cp[i] = if i + 1 < n { c[i] / denom } else { 0.0 };
        d[i] = (d[i] - a[i] * d[i - 1]) / denom;
    }
    for i in (0..n - 1).rev() {
        d[i] -= cp[i] * d[i + 1];
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A Gaussian mound exp(-rho^2 / (4 tau0)) under 2-D diffusion stays Gaussian:
    /// (tau0 / (tau0 + tau)) exp(-rho^2 / (4 (tau0 + tau))) (the heat kernel; Carslaw and
    /// Jaeger 1959, Conduction of Heat in Solids, 2nd ed., Oxford, ch. 10).
    #[test]
    fn gaussian_mound_matches_heat_kernel_carslaw_jaeger() {
        let (h, n, tau0, tau) = (0.01, 801, 0.02, 0.1);
        let gauss = |rho: f64, t: f64| tau0 / t * (-rho * rho / (4.0 * t)).exp();
        let mut z: Vec<f64> = (0..n).map(|i| gauss(i as f64 * h, tau0)).collect();
        diffuse_radial(&mut z, h, tau);
        let worst = (0..n)
            .map(|i| (z[i] - gauss(i as f64 * h, tau0 + tau)).abs())
            .fold(0.0, f64::max);
        assert!(
            worst < 2e-3,
            "worst error {worst} of a peak {}",
            gauss(0.0, tau0 + tau)
        );
    }

    #[test]
    fn zero_time_leaves_profile_unchanged() {
        let mut z = vec![1.0, 2.0, 3.0, 0.0];
        diffuse_radial(&mut z, 0.1, 0.0);
        assert_eq!(z, vec![1.0, 2.0, 3.0, 0.0]);
    }
}

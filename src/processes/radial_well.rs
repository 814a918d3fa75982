//! The radial potential well of an electron beam and the ion clouds in it: how much of a
//! cloud overlaps the beam, how much room it takes, and the potential energy an ion gains
//! when it is ionized inside the beam.
//!
//! # Model
//! A uniform beam of radius `r_e` carrying current `I` at electron speed `v_e`, inside a
//! drift tube of radius `r_d`, partly neutralised by trapped ions (compensation `c`, the
//! trapped positive charge over the electrons' charge). By Gauss's law the potential energy
//! of a positive ion of charge `q` rises outward as `q e φ(r)`, with
//!
//! - `φ(r) = φ₀ (1 − c) (r/r_e)²` inside the beam,
//! - `φ(r) = φ₀ (1 − c) [1 + 2 ln(r/r_e)]` outside,
//! - `φ₀ = I / (4π ε₀ v_e)` (≈ 30 Ω · I/β), the radial well depth
//!   `V_rad = φ₀ (1 − c) [1 + 2 ln(r_d/r_e)]`.
//!
//! Scaling the whole well by `(1 − c)` is the first-order effect of the trapped charge
//! (Penetrante, Bardsley, DeWitt, Clark & Schneider, Phys. Rev. A 43, 4861 (1991)). Ions at
//! temperature `kT` follow the Boltzmann distribution `n(r) ∝ exp(−q e φ(r)/kT)`. With the
//! reduced depth `a = q φ₀ (1 − c)/kT` (φ₀ in volts, kT in eV) and `ρ = r_d/r_e` the radial
//! integrals are closed:
//!
//! - inside: `∫₀^{r_e} e^{−a r²/r_e²} 2πr dr = π r_e² (1 − e^{−a})/a`,
//! - outside: `π r_e² e^{−a} · 2 ∫₁^ρ x^{1−2a} dx = π r_e² e^{−a} (ρ^{2−2a} − 1)/(1 − a)`,
//!
//! so the overlap with the beam `f = inside/(inside + outside)` goes to 1 for `kT ≪ qφ₀` and
//! to `(r_e/r_d)²` for `kT ≫ q V_rad`. The cloud's effective cross-section area
//! `A = (inside + outside)` (normalised to the density on the axis) gives the density on the
//! axis `N/(L A)`. An ion ionized inside the beam at radius r gains `e φ(r)` of potential
//! energy; averaged over the Boltzmann distribution inside the beam,
//! `⟨φ⟩ = φ₀ (1 − c) [1/a − 1/(e^a − 1)]` (→ φ₀(1 − c)/2 for a hot cloud).
//!
//! # Validity and accuracy
//! Exact for a uniform, infinitely long beam with thermal ions in a fixed well; real beams
//! have a Gaussian-like core and a halo, which shift the overlap by tens of percent for clouds
//! of about the beam's size (Penetrante et al. 1991 discuss the same approximation). For
//! `c ≥ 1` the well is gone: the cloud fills the drift tube uniformly (`f = (r_e/r_d)²`).
//! The closed forms are checked against numerical quadrature (scipy.integrate.quad) in the
//! Python tests and against their limits here.

use crate::constants::EPSILON_0;
use std::f64::consts::PI;

/// The radial well of one beam: the geometry and the trapped charge's compensation.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct RadialWell {
    /// φ₀ = I/(4π ε₀ v_e) in volts: the potential rise from the axis to the beam edge of the
    /// uncompensated beam.
    pub edge_potential_v: f64,
    /// Beam radius (m).
    pub beam_radius_m: f64,
    /// Drift-tube radius (m), larger than the beam radius.
    pub drift_tube_radius_m: f64,
    /// Trapped positive charge over the electrons' charge (0 = none; ≥ 1 = no well left).
    pub compensation: f64,
}

/// The cloud of one population (charge q at temperature kT) in a radial well.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct CloudShape {
    /// Fraction of the cloud inside the beam (0 … 1).
    pub overlap: f64,
    /// Effective cross-section area of the cloud (m²): ions / (length · density on the axis).
    pub area_m2: f64,
    /// Mean potential (V) at the place of an ion inside the beam (for ionization heating).
    pub mean_inside_potential_v: f64,
}

/// φ₀ = I/(4π ε₀ v_e) in volts for a beam current (A) and electron speed (m/s).
pub fn beam_edge_potential_v(current_a: f64, electron_speed_m_s: f64) -> f64 {
    current_a / (4.0 * PI * EPSILON_0 * electron_speed_m_s)
}

impl RadialWell {
    /// The depth (V) from the axis to the drift tube: φ₀ (1 − c) [1 + 2 ln(r_d/r_e)], zero
    /// once the trapped charge fills the beam's space charge.
    pub fn depth_v(&self) -> f64 {
        let rho = self.drift_tube_radius_m / self.beam_radius_m;
        self.scaled_potential_v() * (1.0 + 2.0 * rho.ln())
    }

    /// φ₀ (1 − c), never negative.
    fn scaled_potential_v(&self) -> f64 {
        self.edge_potential_v * (1.0 - self.compensation).max(0.0)
    }

    /// The cloud of ions of charge `charge` at temperature `temperature_ev` (eV).
    pub fn cloud(&self, charge: f64, temperature_ev: f64) -> CloudShape {
        let re2 = self.beam_radius_m * self.beam_radius_m;
        let ln_rho = (self.drift_tube_radius_m / self.beam_radius_m).ln();
        let phi = self.scaled_potential_v();
        let a = charge * phi / temperature_ev;
        let (inside, outside) = radial_integrals(a, ln_rho);
        let overlap = inside / (inside + outside);
        CloudShape {
            overlap,
            area_m2: PI * re2 * (inside + outside),
            mean_inside_potential_v: phi * mean_x_inside(a),
        }
    }
}

/// The inside and outside integrals in units of π r_e², for reduced depth `a` and
/// ln ρ = ln(r_d/r_e) > 0, in forms that stay accurate as a → 0, a → 1 and a → ∞.
fn radial_integrals(a: f64, ln_rho: f64) -> (f64, f64) {
    // NaN or a non-positive depth: no well, the cloud is uniform over the tube.
    if a.is_nan() || a <= 0.0 {
        return (1.0, (2.0 * ln_rho).exp_m1());
    }
    // A cloud at (nearly) zero temperature sits on the axis; the cap keeps 1/a above zero.
    let a = a.min(1e300);
    // (1 − e^{−a})/a
    let inside = if a < 1e-8 {
        1.0 - a / 2.0
    } else {
        -(-a).exp_m1() / a
    };
    // e^{−a} (ρ^{2−2a} − 1)/(1 − a) = e^{−a} · 2 ln ρ · expm1(b)/b, b = (2 − 2a) ln ρ
    let b = (2.0 - 2.0 * a) * ln_rho;
    let ratio = if b.abs() < 1e-8 {
        1.0 + b / 2.0
    } else {
        b.exp_m1() / b
    };
    // Written as one exponent so e^{−a} ρ^{2−2a} cannot overflow for large a.
    let outside = if b > 700.0 {
        2.0 * ln_rho * ((b - a) - b.ln()).exp()
    } else {
        (-a).exp() * 2.0 * ln_rho * ratio
    };
    (inside, outside)
}

/// ⟨r²/r_e²⟩ over e^{−a r²/r_e²} inside the beam: 1/a − 1/(e^a − 1), → 1/2 as a → 0.
fn mean_x_inside(a: f64) -> f64 {
    if a <= 0.0 {
        0.5
    } else if a < 1e-4 {
        0.5 - a / 12.0
    } else if a > 700.0 {
        1.0 / a
    } else {
        1.0 / a - 1.0 / a.exp_m1()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn well(c: f64) -> RadialWell {
        RadialWell {
            edge_potential_v: 100.0,
            beam_radius_m: 50e-6,
            drift_tube_radius_m: 5e-3,
            compensation: c,
        }
    }

    /// Midpoint-rule quadrature of the Boltzmann weight in x = r²/r_e² (so 2πr dr = π r_e² dx).
    fn quadrature(a: f64, rho: f64) -> (f64, f64) {
        let n = 200_000;
        let inside: f64 = (0..n)
            .map(|i| (-(a * (i as f64 + 0.5) / n as f64)).exp() / n as f64)
            .sum();
        // Outside in u = ln x from 0 to 2 ln ρ: dx = x du, φ/φ₀ = 1 + u.
        let umax = 2.0 * rho.ln();
        let outside: f64 = (0..n)
            .map(|i| {
                let u = (i as f64 + 0.5) / n as f64 * umax;
                (-a * (1.0 + u)).exp() * u.exp() * umax / n as f64
            })
            .sum();
        (inside, outside)
    }

    #[test]
    fn closed_forms_equal_quadrature() {
        let rho: f64 = 100.0;
        for a in [1e-6, 0.01, 0.5, 0.999_999_9, 1.0, 1.3, 5.0, 40.0] {
            let (i, o) = radial_integrals(a, rho.ln());
            let (qi, qo) = quadrature(a, rho);
            assert!((i / qi - 1.0).abs() < 1e-6, "a = {a}: {i} vs {qi}");
            assert!((o / qo - 1.0).abs() < 1e-5, "a = {a}: {o} vs {qo}");
        }
    }

    #[test]
    fn overlap_limits() {
        let w = well(0.0);
        // Cold and highly charged: inside the beam.
        assert!(w.cloud(30.0, 1.0).overlap > 0.999_999);
        // Very hot: uniform over the tube, (r_e/r_d)² = 1e-4.
        let hot = w.cloud(1.0, 1e9).overlap;
        assert!((hot / 1e-4 - 1.0).abs() < 1e-3, "{hot}");
        // Full compensation removes the well.
        let gone = well(1.0).cloud(30.0, 1.0).overlap;
        assert!((gone / 1e-4 - 1.0).abs() < 1e-9, "{gone}");
        // Overlap falls with temperature and rises with charge.
        assert!(w.cloud(10.0, 100.0).overlap > w.cloud(10.0, 300.0).overlap);
        assert!(w.cloud(20.0, 300.0).overlap > w.cloud(10.0, 300.0).overlap);
    }

    #[test]
    fn area_and_mean_potential() {
        let w = well(0.0);
        let cold = w.cloud(1.0, 1e-3);
        // Cold cloud: area π r_e²/a with a = qφ₀/kT = 1e5.
        let expect = PI * 50e-6 * 50e-6 / 1e5;
        assert!((cold.area_m2 / expect - 1.0).abs() < 1e-9);
        assert!((cold.mean_inside_potential_v - 100.0 / 1e5).abs() < 1e-9);
        // Hot cloud: half the edge potential on average inside the beam.
        assert!((w.cloud(1.0, 1e12).mean_inside_potential_v - 50.0).abs() < 1e-6);
        let depth = w.depth_v();
        assert!((depth - 100.0 * (1.0 + 2.0 * 100f64.ln())).abs() < 1e-9);
        assert_eq!(well(1.5).depth_v(), 0.0);
    }

    #[test]
    fn edge_potential_engineering_form() {
        // φ₀ = I/(4π ε₀ v) ≈ 29.98 Ω · I/β (common practice): 1 A at β = 0.2.
        let v = 0.2 * crate::constants::SPEED_OF_LIGHT_M_S;
        let phi = beam_edge_potential_v(1.0, v);
        assert!((phi - 29.979_245_8 / 0.2).abs() < 1e-3, "{phi}");
    }
}

//! The electron beam of a trap: speed, current density, radius (given, Brillouin or
//! Herrmann), space-charge potential depression and the resulting on-axis energy.
//!
//! # Model
//!
//! * Speed: γ = 1 + E/(m_e c²), β = √(1 − 1/γ²), v = βc; current density j = I/(π r²) of a
//!   uniform beam; electrons in a trap of length L: N_e = I L/(e v).
//! * Brillouin radius, L. Brillouin, Phys. Rev. 67, 260 (1945):
//!   r_B = √(2 γ m_e I/(π ε₀ v e B²)), with γm_e in place of m_e (1.7 % larger than the
//!   non-relativistic form at 10 keV).
//! * Herrmann radius enclosing 80 % of the current, G. Herrmann, J. Appl. Phys. 29, 127
//!   (1958) (from memory): r_H = r_B √{½ + √[¼ + 8 k T_c m_e r_c²/(e² B² r_B⁴) +
//!   B_c² r_c⁴/(B² r_B⁴)]} with cathode temperature T_c, radius r_c and field B_c.
//! * Space-charge depression of a uniform beam of radius a in a drift tube of radius b
//!   (Gauss's law): ΔU = I/(4πε₀ v)·(1 + 2 ln(b/a)) ≈ 30 Ω·I/β·(1 + 2 ln(b/a)), axis to wall;
//!   the energy on axis solves E = e U − e ΔU(E)(1 − f), f the fraction of the electron space
//!   charge compensated by ions, up to the space-charge-limited current.
//!
//! # Validity and accuracy
//!
//! A uniform, laminar beam in a long drift tube (no end effects, no radial profile, no
//! thermal spread beyond the Herrmann term). Checked: the Brillouin radius agrees within 3 %
//! with the engineering rule `r_B[µm] ≈ 150/B[T]·√(I[A]/√E[keV])` (common practice) at
//! 1–10 keV and is 147.9 µm at 1 A, 1 keV, 1 T (147.6 µm non-relativistically); the
//! Herrmann radius reduces to r_B for a cold cathode without field and to flux conservation
//! r_c √(B_c/B) when the cathode flux dominates; the non-relativistic limiting current is
//! the usual 25.4 µA·U^{3/2}/(1 + 2 ln(b/a)) within 0.2 % with the beam at U/3 (common
//! practice).

use crate::constants::{
    BOLTZMANN_J_K, ELECTRON_MASS_KG, ELECTRON_REST_EV, ELEMENTARY_CHARGE_C, EPSILON_0,
    SPEED_OF_LIGHT_M_S,
};
use crate::error::{require_non_negative, require_positive, Error, Result};
use std::f64::consts::PI;

/// Lorentz factor γ = 1 + E/(m_e c²) of an electron of kinetic energy E (eV).
pub fn lorentz_gamma(energy_ev: f64) -> f64 {
    1.0 + energy_ev / ELECTRON_REST_EV
}

/// Relativistic speed v = βc (m/s) of an electron of kinetic energy E (eV).
pub fn electron_speed_m_s(energy_ev: f64) -> f64 {
    // β = √(E(E + 2mc²))/(E + mc²) equals √(1 − 1/γ²) without its cancellation at low E.
    let m = ELECTRON_REST_EV;
    SPEED_OF_LIGHT_M_S * (energy_ev * (energy_ev + 2.0 * m)).sqrt() / (energy_ev + m)
}

/// Current density I/(πr²) of a uniform beam, in A/cm² (radius in m).
pub fn current_density_a_cm2(current_a: f64, radius_m: f64) -> f64 {
    let r_cm = radius_m * 100.0;
    current_a / (PI * r_cm * r_cm)
}

/// Brillouin radius (m) of a beam of current I (A) and energy E (eV) in a field B (T),
/// L. Brillouin, Phys. Rev. 67, 260 (1945):
///
/// r_B = √(2 γ m_e I / (π ε₀ v e B²))
///
/// The relativistic mass γm_e replaces m_e (it enters through the rotation balance), and v
/// is the relativistic speed; at 10 keV this raises r_B by 1.7 % over the
/// non-relativistic form.
pub fn brillouin_radius_m(current_a: f64, energy_ev: f64, magnetic_field_t: f64) -> f64 {
    let v = electron_speed_m_s(energy_ev);
    let mass = lorentz_gamma(energy_ev) * ELECTRON_MASS_KG;
    (2.0 * mass * current_a
        / (PI * EPSILON_0 * v * ELEMENTARY_CHARGE_C * magnetic_field_t * magnetic_field_t))
        .sqrt()
}

/// Check a derived quantity: inputs that are each allowed can still combine to a value f64
/// cannot hold (a subnormal radius gives an infinite current density, subnormal currents a
/// radius of 0). Those are refused instead of returned.
fn require_representable(what: &str, value: f64, inputs: &str) -> Result<f64> {
    if value.is_finite() && value.is_normal() && value > 0.0 {
        Ok(value)
    } else {
        Err(Error::invalid(
            what,
            value,
            &format!("{inputs} give a value outside the range of 64-bit floats; use inputs nearer the physical range"),
        ))
    }
}

/// [`brillouin_radius_m`] with its inputs checked (finite, > 0) and its result too.
pub fn checked_brillouin_radius_m(
    current_a: f64,
    energy_ev: f64,
    magnetic_field_t: f64,
) -> Result<f64> {
    require_positive("current_a", current_a)?;
    require_positive("energy_ev", energy_ev)?;
    require_positive("magnetic_field_t", magnetic_field_t)?;
    require_representable(
        "brillouin_radius_m",
        brillouin_radius_m(current_a, energy_ev, magnetic_field_t),
        "current_a, energy_ev and magnetic_field_t",
    )
}

/// Herrmann radius (m) enclosing 80 % of the current, G. Herrmann, J. Appl. Phys. 29, 127
/// (1958) (from memory):
///
/// r_H = r_B √{½ + √[¼ + 8 k T_c m_e r_c² / (e² B² r_B⁴) + B_c² r_c⁴ / (B² r_B⁴)]}
///
/// with T_c (K) and r_c (m) the cathode temperature and radius and B_c (T) the field at the
/// cathode. With T_c = B_c = 0 it reduces to the Brillouin radius; a large B_c gives flux
/// conservation r_H → r_c √(B_c/B).
pub fn herrmann_radius_m(
    current_a: f64,
    energy_ev: f64,
    magnetic_field_t: f64,
    cathode_radius_m: f64,
    cathode_temperature_k: f64,
    cathode_field_t: f64,
) -> f64 {
    let rb = brillouin_radius_m(current_a, energy_ev, magnetic_field_t);
    let (b, rc, bc) = (magnetic_field_t, cathode_radius_m, cathode_field_t);
    let rb4 = rb.powi(4);
    let thermal = 8.0 * BOLTZMANN_J_K * cathode_temperature_k * ELECTRON_MASS_KG * rc * rc
        / (ELEMENTARY_CHARGE_C * ELEMENTARY_CHARGE_C * b * b * rb4);
    let flux = bc * bc * rc.powi(4) / (b * b * rb4);
    rb * (0.5 + (0.25 + thermal + flux).sqrt()).sqrt()
}

/// 1/(4πε₀c) in Ω (≈ 30 Ω).
fn vacuum_impedance_over_4pi_ohm() -> f64 {
    1.0 / (4.0 * PI * EPSILON_0 * SPEED_OF_LIGHT_M_S)
}

/// Space-charge potential depression (V) from the drift-tube wall to the axis of a uniform
/// beam of radius a inside a tube of radius b (Gauss's law, common practice):
///
/// ΔU = I/(4πε₀ v) · (1 + 2 ln(b/a)) ≈ 30 Ω · I/β · (1 + 2 ln(b/a))
pub fn space_charge_depression_v(
    current_a: f64,
    energy_ev: f64,
    beam_radius_m: f64,
    drift_tube_radius_m: f64,
) -> f64 {
    let geometry = 1.0 + 2.0 * (drift_tube_radius_m.ln() - beam_radius_m.ln());
    current_a * geometry / (4.0 * PI * EPSILON_0 * electron_speed_m_s(energy_ev))
}

fn validate_tube(
    tube_to_cathode_v: f64,
    beam_radius_m: f64,
    drift_tube_radius_m: f64,
    compensation: f64,
) -> Result<()> {
    require_positive("tube_to_cathode_v", tube_to_cathode_v)?;
    require_positive("beam_radius_m", beam_radius_m)?;
    require_positive("drift_tube_radius_m", drift_tube_radius_m)?;
    if drift_tube_radius_m < beam_radius_m {
        return Err(Error::invalid(
            "drift_tube_radius_m",
            drift_tube_radius_m,
            &format!("must be >= beam_radius_m = {beam_radius_m}"),
        ));
    }
    if !(compensation.is_finite() && (0.0..=1.0).contains(&compensation)) {
        return Err(Error::invalid(
            "compensation",
            compensation,
            "the compensated fraction of the electron space charge must lie in [0, 1]",
        ));
    }
    Ok(())
}

/// Geometry factor (1 − f)(1 + 2 ln(b/a)) of the depression.
fn depression_geometry(beam_radius_m: f64, drift_tube_radius_m: f64, compensation: f64) -> f64 {
    (1.0 - compensation) * (1.0 + 2.0 * (drift_tube_radius_m.ln() - beam_radius_m.ln()))
}

/// Largest current (A) a beam can carry through the drift tube at the given tube-to-cathode
/// voltage before its own space charge stops it.
///
/// On axis E = U − K/β(E) with K = (1 − f)(1 + 2 ln(b/a))·I/(4πε₀c). The right-hand side
/// E + K/β(E) has its minimum at γ*² = 1 + (K/m_e c²)^(2/3), where it equals
/// m_e c²(γ*³ − 1); solutions exist while that minimum is ≤ U, so the limit is
/// γ*³ = 1 + U/(m_e c²), K_lim = m_e c²(γ*² − 1)^(3/2). Non-relativistically this is the
/// familiar 25.4 µA·U^(3/2)/(1 + 2 ln(b/a)) with the beam at U/3 (common practice).
/// Infinite for full compensation.
pub fn space_charge_limited_current_a(
    tube_to_cathode_v: f64,
    beam_radius_m: f64,
    drift_tube_radius_m: f64,
    compensation: f64,
) -> Result<f64> {
    validate_tube(
        tube_to_cathode_v,
        beam_radius_m,
        drift_tube_radius_m,
        compensation,
    )?;
    let m = ELECTRON_REST_EV;
    // γ*² − 1 = (1 + U/mc²)^(2/3) − 1, via ln_1p/exp_m1 so low voltages keep their digits.
    let g2m1 = ((2.0 / 3.0) * (tube_to_cathode_v / m).ln_1p()).exp_m1();
    let k_lim = m * g2m1.powf(1.5);
    let geometry = depression_geometry(beam_radius_m, drift_tube_radius_m, compensation);
    Ok(k_lim / (geometry * vacuum_impedance_over_4pi_ohm()))
}

/// Electron energy (eV) on the beam axis: the tube-to-cathode voltage less the uncompensated
/// part of the space-charge depression, E = e U − e ΔU(E)(1 − f). The
/// depression depends on the speed and so on E itself; the equation is solved on its
/// physical (high-energy) branch by bisection to machine precision. Errors when the current
/// exceeds [`space_charge_limited_current_a`], where no solution exists.
pub fn effective_energy_ev(
    tube_to_cathode_v: f64,
    current_a: f64,
    beam_radius_m: f64,
    drift_tube_radius_m: f64,
    compensation: f64,
) -> Result<f64> {
    validate_tube(
        tube_to_cathode_v,
        beam_radius_m,
        drift_tube_radius_m,
        compensation,
    )?;
    require_non_negative("current_a", current_a)?;
    let u = tube_to_cathode_v;
    let m = ELECTRON_REST_EV;
    let k = depression_geometry(beam_radius_m, drift_tube_radius_m, compensation)
        * current_a
        * vacuum_impedance_over_4pi_ohm();
    if k == 0.0 {
        return require_representable("effective_energy_ev", u, "the tube-to-cathode voltage");
    }
    let limit =
        space_charge_limited_current_a(u, beam_radius_m, drift_tube_radius_m, compensation)?;
    if current_a > limit {
        return Err(Error::invalid(
            "current_a",
            current_a,
            &format!(
                "the beam cannot propagate: its space charge limits the current to {limit:.4e} A \
                 at {u} V with this beam and drift-tube radius and compensation"
            ),
        ));
    }
    let h = |e: f64| e + k * SPEED_OF_LIGHT_M_S / electron_speed_m_s(e);
    // Minimum of h: (γ² − 1)^(3/2) = K/mc².
    let e_min = m * ((1.0 + (k / m).powf(2.0 / 3.0)).sqrt() - 1.0);
    let (mut lo, mut hi) = (e_min.min(u), u);
    if h(lo) > u {
        // Only rounding at the very limit gets here: the two branches meet at e_min.
        return Ok(lo);
    }
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if mid <= lo || mid >= hi {
            break;
        }
        if h(mid) > u {
            hi = mid;
        } else {
            lo = mid;
        }
    }
    require_representable(
        "effective_energy_ev",
        0.5 * (lo + hi),
        "tube_to_cathode_v, current_a and the radii",
    )
}

/// Number of electrons N_e = I L/(e v) inside a trap of length L (m).
pub fn electrons_in_trap(current_a: f64, energy_ev: f64, length_m: f64) -> f64 {
    current_a * length_m / (ELEMENTARY_CHARGE_C * electron_speed_m_s(energy_ev))
}

/// How the size of a beam is given: exactly one of its radius, its current density or the
/// magnetic field that compresses it (the Brillouin radius, or Herrmann's with the cathode's
/// radius, temperature and field). The one place this rule is written; the Python
/// constructor and the scenario checker both use it.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum BeamSize {
    Radius(f64),
    CurrentDensity(f64),
    Brillouin {
        magnetic_field_t: f64,
    },
    Herrmann {
        magnetic_field_t: f64,
        cathode_radius_m: f64,
        cathode_temperature_k: f64,
        cathode_field_t: f64,
    },
}

impl BeamSize {
    /// The size from the optional fields as a user writes them. An error names the field at
    /// fault (its `name`), so callers can point at it.
    pub fn from_fields(
        radius_m: Option<f64>,
        current_density_a_cm2: Option<f64>,
        magnetic_field_t: Option<f64>,
        cathode_radius_m: Option<f64>,
        cathode_temperature_k: Option<f64>,
        cathode_field_t: Option<f64>,
    ) -> Result<Self> {
        let sizes = [
            ("radius_m", radius_m),
            ("current_density_a_cm2", current_density_a_cm2),
            ("magnetic_field_t", magnetic_field_t),
        ];
        let given: Vec<&str> = sizes
            .iter()
            .filter(|(_, v)| v.is_some())
            .map(|(k, _)| *k)
            .collect();
        let size_error = || {
            let (name, how) = match given.get(1) {
                None => ("radius_m", "missing".to_string()),
                Some(second) => (*second, format!("given twice ({})", given.join(", "))),
            };
            Error::invalid(
                name,
                format!("the beam size is {how}"),
                "give exactly one of radius_m, current_density_a_cm2 or magnetic_field_t",
            )
        };
        if given.len() != 1 {
            return Err(size_error());
        }
        let cathode = [
            ("cathode_radius_m", cathode_radius_m),
            ("cathode_temperature_k", cathode_temperature_k),
            ("cathode_field_t", cathode_field_t),
        ];
        let first_cathode = cathode.iter().find(|(_, v)| v.is_some()).map(|(k, _)| *k);
        if let (None, Some(name)) = (magnetic_field_t, first_cathode) {
            return Err(Error::invalid(
                name,
                "given",
                "cathode settings size the beam with the magnetic field: give magnetic_field_t too (and no radius_m or current_density_a_cm2)",
            ));
        }
        match (radius_m, current_density_a_cm2, magnetic_field_t) {
            (Some(r), _, _) => Ok(BeamSize::Radius(r)),
            (_, Some(j), _) => Ok(BeamSize::CurrentDensity(j)),
            (_, _, Some(b)) => match (cathode_radius_m, cathode_temperature_k) {
                (Some(rc), Some(tc)) => Ok(BeamSize::Herrmann {
                    magnetic_field_t: b,
                    cathode_radius_m: rc,
                    cathode_temperature_k: tc,
                    cathode_field_t: cathode_field_t.unwrap_or(0.0),
                }),
                (None, None) => Ok(BeamSize::Brillouin {
                    magnetic_field_t: b,
                }),
                (Some(_), None) | (None, Some(_)) => Err(Error::invalid(
                    if cathode_radius_m.is_some() {
                        "cathode_radius_m"
                    } else {
                        "cathode_temperature_k"
                    },
                    "given alone",
                    "give both cathode_radius_m and cathode_temperature_k (for the Herrmann radius) or neither (Brillouin radius)",
                )),
            },
            (None, None, None) => Err(size_error()),
        }
    }
}

/// A uniform electron beam: energy, current, radius and the current density they imply.
#[derive(Clone, Debug)]
pub struct ElectronBeam {
    pub energy_ev: f64,
    pub current_a: f64,
    pub radius_m: f64,
    pub current_density_a_cm2: f64,
    /// Energy spread (FWHM, eV) of the electrons; `None`: the trap's space-charge default
    /// [`beam_energy_spread_ev`].
    pub energy_spread_ev: Option<f64>,
}

/// Default energy spread (full width, eV) of a trap's electron beam: the space-charge
/// potential difference between the axis and the edge of a uniform beam,
/// (1 − f)·I/(4πε₀v) (Gauss's law; the depression with the drift tube at the beam edge),
/// f the compensated fraction. Across a uniform beam the potential is parabolic in r and
/// the area grows as r dr, so the electrons' energies are spread uniformly over this width
/// around the mean; the cathode's thermal spread (≈ kT_c, 0.1 eV) is negligible beside it.
pub fn beam_energy_spread_ev(
    energy_ev: f64,
    current_a: f64,
    radius_m: f64,
    compensation: f64,
) -> f64 {
    (1.0 - compensation) * space_charge_depression_v(current_a, energy_ev, radius_m, radius_m)
}

impl ElectronBeam {
    /// Beam of given radius (m).
    pub fn with_radius(energy_ev: f64, current_a: f64, radius_m: f64) -> Result<Self> {
        require_positive("energy_ev", energy_ev)?;
        require_positive("current_a", current_a)?;
        require_positive("radius_m", radius_m)?;
        let j = require_representable(
            "current_density_a_cm2",
            current_density_a_cm2(current_a, radius_m),
            "current_a and radius_m",
        )?;
        Ok(Self {
            energy_ev,
            current_a,
            radius_m,
            current_density_a_cm2: j,
            energy_spread_ev: None,
        })
    }

    /// Beam of given current density (A/cm²); the radius follows from I = jπr².
    pub fn with_current_density(
        energy_ev: f64,
        current_a: f64,
        current_density_a_cm2: f64,
    ) -> Result<Self> {
        require_positive("energy_ev", energy_ev)?;
        require_positive("current_a", current_a)?;
        require_positive("current_density_a_cm2", current_density_a_cm2)?;
        let radius_cm = (current_a / (PI * current_density_a_cm2)).sqrt();
        let radius_m = require_representable(
            "radius_m",
            radius_cm / 100.0,
            "current_a and current_density_a_cm2",
        )?;
        Ok(Self {
            energy_ev,
            current_a,
            radius_m,
            current_density_a_cm2,
            energy_spread_ev: None,
        })
    }

    /// The same beam with a given energy spread (FWHM, eV, ≥ 0), or the default (`None`).
    pub fn with_energy_spread(mut self, energy_spread_ev: Option<f64>) -> Result<Self> {
        if let Some(v) = energy_spread_ev {
            require_non_negative("energy_spread_ev", v)?;
        }
        self.energy_spread_ev = energy_spread_ev;
        Ok(self)
    }

    /// Beam compressed to its Brillouin radius in a field B (T).
    pub fn with_magnetic_field(
        energy_ev: f64,
        current_a: f64,
        magnetic_field_t: f64,
    ) -> Result<Self> {
        require_positive("energy_ev", energy_ev)?;
        require_positive("current_a", current_a)?;
        require_positive("magnetic_field_t", magnetic_field_t)?;
        Self::with_radius(
            energy_ev,
            current_a,
            checked_brillouin_radius_m(current_a, energy_ev, magnetic_field_t)?,
        )
    }

    /// Beam of the Herrmann radius (80 % of the current) for a cathode of given radius (m),
    /// temperature (K) and residual field (T).
    pub fn with_herrmann(
        energy_ev: f64,
        current_a: f64,
        magnetic_field_t: f64,
        cathode_radius_m: f64,
        cathode_temperature_k: f64,
        cathode_field_t: f64,
    ) -> Result<Self> {
        require_positive("energy_ev", energy_ev)?;
        require_positive("current_a", current_a)?;
        require_positive("magnetic_field_t", magnetic_field_t)?;
        require_positive("cathode_radius_m", cathode_radius_m)?;
        // A cathode emits only when hot: 0 K is not a cathode temperature.
        require_positive("cathode_temperature_k", cathode_temperature_k)?;
        require_non_negative("cathode_field_t", cathode_field_t)?;
        let radius_m = herrmann_radius_m(
            current_a,
            energy_ev,
            magnetic_field_t,
            cathode_radius_m,
            cathode_temperature_k,
            cathode_field_t,
        );
        Self::with_radius(energy_ev, current_a, radius_m)
    }

    /// A beam of the given size (see [`BeamSize`]).
    pub fn new(energy_ev: f64, current_a: f64, size: BeamSize) -> Result<Self> {
        match size {
            BeamSize::Radius(r) => Self::with_radius(energy_ev, current_a, r),
            BeamSize::CurrentDensity(j) => Self::with_current_density(energy_ev, current_a, j),
            BeamSize::Brillouin { magnetic_field_t } => {
                Self::with_magnetic_field(energy_ev, current_a, magnetic_field_t)
            }
            BeamSize::Herrmann {
                magnetic_field_t,
                cathode_radius_m,
                cathode_temperature_k,
                cathode_field_t,
            } => Self::with_herrmann(
                energy_ev,
                current_a,
                magnetic_field_t,
                cathode_radius_m,
                cathode_temperature_k,
                cathode_field_t,
            ),
        }
    }

    /// Electron flux j/e in electrons cm⁻² s⁻¹.
    pub fn electron_flux_per_cm2_s(&self) -> f64 {
        self.current_density_a_cm2 / ELEMENTARY_CHARGE_C
    }

    /// Space-charge depression axis-to-wall (V) of this beam in a drift tube of radius (m),
    /// with the tube radius checked (finite, at least the beam radius) and the result too.
    pub fn depression_in_tube_v(&self, drift_tube_radius_m: f64) -> Result<f64> {
        require_positive("drift_tube_radius_m", drift_tube_radius_m)?;
        if drift_tube_radius_m < self.radius_m {
            return Err(Error::invalid(
                "drift_tube_radius_m",
                drift_tube_radius_m,
                &format!("must be >= the beam radius {} m", self.radius_m),
            ));
        }
        let v = space_charge_depression_v(
            self.current_a,
            self.energy_ev,
            self.radius_m,
            drift_tube_radius_m,
        );
        if v.is_finite() {
            Ok(v)
        } else {
            Err(Error::invalid(
                "drift_tube_radius_m",
                drift_tube_radius_m,
                "gives an infinite depression against this beam radius; use a tube radius nearer the beam's",
            ))
        }
    }

    /// Electron speed in m/s.
    pub fn speed_m_s(&self) -> f64 {
        electron_speed_m_s(self.energy_ev)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn beam_size_takes_exactly_one_size_and_names_the_field_at_fault() {
        let name = |r: Result<BeamSize>| match r {
            Err(Error::InvalidParameter { name, .. }) => name,
            other => panic!("{other:?}"),
        };
        assert_eq!(
            name(BeamSize::from_fields(None, None, None, None, None, None)),
            "radius_m"
        );
        assert_eq!(
            name(BeamSize::from_fields(
                Some(1e-4),
                Some(100.0),
                None,
                None,
                None,
                None
            )),
            "current_density_a_cm2"
        );
        assert_eq!(
            name(BeamSize::from_fields(
                Some(1e-4),
                None,
                None,
                Some(1e-3),
                None,
                None
            )),
            "cathode_radius_m"
        );
        assert_eq!(
            name(BeamSize::from_fields(
                None,
                None,
                Some(1.0),
                None,
                Some(1300.0),
                None
            )),
            "cathode_temperature_k"
        );
        assert_eq!(
            BeamSize::from_fields(None, None, Some(2.0), None, None, None).unwrap(),
            BeamSize::Brillouin {
                magnetic_field_t: 2.0
            }
        );
        let herrmann = BeamSize::from_fields(None, None, Some(2.0), Some(1e-3), Some(1300.0), None);
        assert!(
            matches!(herrmann, Ok(BeamSize::Herrmann { cathode_field_t, .. }) if cathode_field_t == 0.0)
        );
        let beam = ElectronBeam::new(5000.0, 0.1, BeamSize::CurrentDensity(300.0)).unwrap();
        assert!((beam.current_density_a_cm2 - 300.0).abs() < 1e-9);
    }

    fn rel(a: f64, b: f64) -> f64 {
        (a - b).abs() / b.abs()
    }

    #[test]
    fn speed_at_10_kev() {
        // Hand value: γ = 1 + 10000/510998.95 = 1.0195695, β = √(1 − 1/γ²) = 0.1949856
        // (≈ 0.1950), v = 5.84552e7 m/s.
        assert!(rel(lorentz_gamma(1e4), 1.019_569_512) < 1e-9);
        let beta = electron_speed_m_s(1e4) / SPEED_OF_LIGHT_M_S;
        assert!((beta - 0.194_985_6).abs() < 1e-7, "{beta}");
        // Low energy keeps its digits: β → √(2E/mc²).
        let e = 1e-6;
        assert!(
            rel(
                electron_speed_m_s(e) / SPEED_OF_LIGHT_M_S,
                (2.0 * e / ELECTRON_REST_EV).sqrt()
            ) < 1e-9
        );
    }

    #[test]
    fn brillouin_radius_follows_the_engineering_rule() {
        // r_B[µm] ≈ 150/B·√(I/√E[keV]) (common practice), within 3 % at 1–10 keV.
        for e_kev in [1.0, 2.0, 5.0, 10.0] {
            for i in [0.05, 0.5, 2.0] {
                for b in [0.5, 1.0, 6.0] {
                    let rule_um = 150.0 / b * (i / f64::sqrt(e_kev)).sqrt();
                    let got_um = brillouin_radius_m(i, e_kev * 1e3, b) * 1e6;
                    assert!(
                        rel(got_um, rule_um) < 0.03,
                        "{e_kev} keV {i} A {b} T: {got_um} vs {rule_um}"
                    );
                }
            }
        }
        // Engineering rule (common practice): 147.6 µm at 1 A, 1 keV, 1 T non-relativistically;
        // γ adds 0.2 %.
        assert!((brillouin_radius_m(1.0, 1e3, 1.0) * 1e6 - 147.9).abs() < 0.1);
    }

    #[test]
    fn herrmann_limits() {
        let (i, e, b) = (0.5, 10e3, 4.0);
        let rb = brillouin_radius_m(i, e, b);
        assert!(rel(herrmann_radius_m(i, e, b, 1e-3, 0.0, 0.0), rb) < 1e-14);
        // Flux conservation (Busch's theorem, common practice) when the cathode flux dominates.
        let (rc, bc) = (2e-3, 0.5);
        let rh = herrmann_radius_m(i, e, b, rc, 0.0, bc);
        assert!(rel(rh, rc * (bc / b).sqrt()) < 0.02, "{rh}");
        // A hot cathode only widens the beam.
        assert!(herrmann_radius_m(i, e, b, 1e-3, 1500.0, 0.0) > rb);
        assert!(
            herrmann_radius_m(i, e, b, 1e-3, 1500.0, 0.01)
                > herrmann_radius_m(i, e, b, 1e-3, 1500.0, 0.0)
        );
    }

    #[test]
    fn space_charge_depression_hand_calculation() {
        // I = 1 A, E = 10 keV (v = 5.8455215e7 m/s), a = 50 µm, b = 5 mm:
        // I/(4πε₀v) = 153.75107 V; 1 + 2 ln(100) = 10.210340; ΔU = 1569.851 V.
        // Also ≈ 30 Ω · I/β · 10.21 = 30/0.19499 · 10.21 = 1570.9 V.
        let du = space_charge_depression_v(1.0, 1e4, 50e-6, 5e-3);
        assert!((du - 1569.851).abs() < 1e-2, "{du}");
        assert!(rel(du, 30.0 / 0.194_985_6 * 10.210_340) < 1e-3);
    }

    #[test]
    fn effective_energy_is_self_consistent() {
        let (u, a, b) = (10_000.0, 50e-6, 5e-3);
        for (i, f) in [(0.1, 0.0), (1.0, 0.0), (1.0, 0.5), (2.0, 0.9)] {
            let e = effective_energy_ev(u, i, a, b, f).unwrap();
            let back = u - (1.0 - f) * space_charge_depression_v(i, e, a, b);
            assert!(rel(e, back) < 1e-12, "I = {i}, f = {f}: {e} vs {back}");
            assert!(e < u);
        }
        assert_eq!(effective_energy_ev(u, 1.0, a, b, 1.0).unwrap(), u);
        assert_eq!(effective_energy_ev(u, 0.0, a, b, 0.0).unwrap(), u);
    }

    #[test]
    fn space_charge_limit_matches_the_non_relativistic_rule() {
        // Non-relativistic limit: I_lim = 25.4 µA·U^(3/2)/(1 + 2 ln(b/a)), beam on axis at
        // U/3 (common practice). At 200 V relativistic corrections are ~1e-4.
        let (u, a, b) = (200.0, 1e-3, 4e-3);
        let geometry = 1.0 + 2.0 * 4f64.ln();
        let lim = space_charge_limited_current_a(u, a, b, 0.0).unwrap();
        assert!(rel(lim, 25.4e-6 * u.powf(1.5) / geometry) < 2e-3, "{lim}");
        let e = effective_energy_ev(u, lim * (1.0 - 1e-9), a, b, 0.0).unwrap();
        assert!(rel(e, u / 3.0) < 1e-3, "{e}");
        let err = effective_energy_ev(u, lim * 1.01, a, b, 0.0).unwrap_err();
        assert!(err.to_string().contains("cannot propagate"), "{err}");
        // Half compensation doubles the limit.
        let half = space_charge_limited_current_a(u, a, b, 0.5).unwrap();
        assert!(rel(half, 2.0 * lim) < 1e-12);
    }

    #[test]
    fn effective_energy_validates() {
        assert!(effective_energy_ev(-1.0, 1.0, 1e-4, 1e-3, 0.0).is_err());
        assert!(effective_energy_ev(1e3, 1.0, 1e-3, 1e-4, 0.0).is_err());
        assert!(effective_energy_ev(1e3, 1.0, 1e-4, 1e-3, 1.5).is_err());
        assert!(effective_energy_ev(1e3, f64::NAN, 1e-4, 1e-3, 0.0).is_err());
    }

    #[test]
    fn electrons_in_trap_hand_value() {
        // I = 1 A, L = 1 m, 10 keV: 1/(1.602176634e-19 · 5.8455215e7) = 1.0677420e11.
        assert!(rel(electrons_in_trap(1.0, 1e4, 1.0), 1.067_742_046e11) < 1e-8);
    }

    #[test]
    fn beam_constructors_agree() {
        let by_radius = ElectronBeam::with_radius(8000.0, 0.3, 70e-6).unwrap();
        // 0.3 A / (π (7e-3 cm)²) = 1948.8 A/cm².
        assert!(rel(by_radius.current_density_a_cm2, 0.3 / (PI * 49e-6)) < 1e-12);
        let by_j = ElectronBeam::with_current_density(8000.0, 0.3, by_radius.current_density_a_cm2)
            .unwrap();
        assert!(rel(by_j.radius_m, 70e-6) < 1e-12);
        let by_b = ElectronBeam::with_magnetic_field(8000.0, 0.3, 3.0).unwrap();
        assert!(rel(by_b.radius_m, brillouin_radius_m(0.3, 8000.0, 3.0)) < 1e-15);
        let by_h = ElectronBeam::with_herrmann(8000.0, 0.3, 3.0, 1e-3, 1400.0, 0.0).unwrap();
        assert!(by_h.radius_m > by_b.radius_m);
        assert!(
            rel(
                by_radius.electron_flux_per_cm2_s() * ELEMENTARY_CHARGE_C,
                by_radius.current_density_a_cm2
            ) < 1e-15
        );
        assert_eq!(by_radius.speed_m_s(), electron_speed_m_s(8000.0));
        assert!(ElectronBeam::with_radius(0.0, 0.3, 70e-6).is_err());
        assert!(ElectronBeam::with_current_density(8000.0, 0.3, f64::NAN).is_err());
        assert!(ElectronBeam::with_magnetic_field(8000.0, -0.3, 3.0).is_err());
        assert!(ElectronBeam::with_herrmann(8000.0, 0.3, 3.0, 1e-3, -1.0, 0.0).is_err());
    }

    #[test]
    fn unrepresentable_results_are_refused() {
        // Subnormal radius: I/(πr²) overflows to inf.
        assert!(ElectronBeam::with_radius(1e3, 0.1, 5e-324).is_err());
        // Subnormal current density: the radius overflows.
        assert!(ElectronBeam::with_current_density(1e3, 0.1, 5e-324).is_err());
        // Subnormal current: the Brillouin radius underflows to 0.
        assert!(checked_brillouin_radius_m(5e-324, 1e3, 1.0).is_err());
        assert!(checked_brillouin_radius_m(0.5, 1e3, 1.0).is_ok());
        assert!(effective_energy_ev(5e-324, 0.0, 1e-4, 1e-3, 0.0).is_err());
        let beam = ElectronBeam::with_radius(1e4, 0.5, 1e-4).unwrap();
        // ln b − ln a, not ln(b/a): a tube of 1e308 m gives a finite (if silly) depression,
        // 1 + 2 ln(1e312) ≈ 1437 times I/(4πε₀v) (hand value).
        let wide = beam.depression_in_tube_v(1e308).unwrap();
        let unit = 0.5 / (4.0 * PI * EPSILON_0 * beam.speed_m_s());
        assert!(rel(wide, unit * (1.0 + 2.0 * 312.0 * std::f64::consts::LN_10)) < 1e-12);
        assert!(beam.depression_in_tube_v(1e-5).is_err());
        assert!(beam.depression_in_tube_v(5e-3).unwrap() > 0.0);
        // A cathode at 0 K does not emit.
        assert!(ElectronBeam::with_herrmann(1e4, 0.5, 1.0, 1e-3, 0.0, 0.0).is_err());
        assert!(ElectronBeam::with_herrmann(1e4, 0.5, 1.0, 1e-3, 1400.0, 0.0).is_ok());
    }
}

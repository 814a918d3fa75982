//! Plausibility warnings: settings the run accepts but the models were not made for. Each
//! warning names the value and the range, with where the range comes from; the plan still
//! computes everything and the Python package raises each one as a `ChargecastWarning`.
//!
//! The ranges and their sources:
//! * current density above [`MAX_PLAUSIBLE_CURRENT_DENSITY_A_CM2`]: the densest
//!   electron-beam traps built reach a few 10⁴ A/cm² (common practice);
//! * beam energy above [`MAX_NONRELATIVISTIC_ENERGY_EV`]: the Lotz cross sections
//!   (W. Lotz, Z. Phys. 216, 241 (1968)) are non-relativistic; above 50 keV (γ > 1.1) the
//!   relativistic rise of the ionization cross section is no longer small (common practice);
//! * beam current above the gun's perveance limit I = P·U^{3/2} with
//!   P = [`MAX_PERVEANCE_A_V32`] = 2 µA/V^{3/2}, U the beam energy in volts: practical
//!   electron guns run at up to about 1–2 µperv (common practice);
//! * a Brillouin radius without the cathode's temperature and radius (Herrmann's
//!   correction, G. Herrmann, J. Appl. Phys. 29, 127 (1958)): real beams are several times
//!   wider than the Brillouin radius, so the current density is overstated (a note);
//! * a time grid that starts after the target has been over-bred (mean charge already
//!   above the target at the first time point);
//! * a beam energy below the energy that opens the target charge state;
//! * a plasma electron temperature (cold or hot) above [`MAX_NONRELATIVISTIC_ENERGY_EV`]:
//!   the Maxwellian rate coefficients of [`crate::sources::plasma`] are non-relativistic.

use super::settings::{BeamTrapSettings, Scenario, SourceSettings};
use crate::atoms::Element;
use crate::sources::electron_beam::current_density_a_cm2;

/// Current densities above this (A/cm²) are beyond any electron-beam trap built.
pub const MAX_PLAUSIBLE_CURRENT_DENSITY_A_CM2: f64 = 1e5;
/// Electron energies above this (eV) leave the non-relativistic cross sections' range.
pub const MAX_NONRELATIVISTIC_ENERGY_EV: f64 = 5e4;
/// Practical perveance limit of an electron gun (A/V^{3/2}).
pub const MAX_PERVEANCE_A_V32: f64 = 2e-6;

/// One plausibility warning.
#[derive(Clone, Debug, PartialEq)]
pub struct Warning {
    /// What is checked: "current_density", "beam_energy", "perveance", "brillouin_radius",
    /// "time_grid", "target_threshold", "electron_temperature".
    pub what: &'static str,
    /// The offending value, in `unit`.
    pub value: f64,
    pub unit: &'static str,
    /// The range the models were made for, with its source.
    pub range: String,
    /// The whole sentence, value and range included.
    pub message: String,
}

impl Warning {
    fn new(what: &'static str, value: f64, unit: &'static str, range: String, text: &str) -> Self {
        let message = format!("{text}: {value:.4e} {unit}; {range}");
        Warning {
            what,
            value,
            unit,
            range,
            message,
        }
    }
}

/// Warnings about an electron beam of energy (eV), current (A) and radius (m).
pub fn beam_warnings(energy_ev: f64, current_a: f64, radius_m: f64) -> Vec<Warning> {
    let mut out = Vec::new();
    let j = current_density_a_cm2(current_a, radius_m);
    if j > MAX_PLAUSIBLE_CURRENT_DENSITY_A_CM2 {
        out.push(Warning::new(
            "current_density",
            j,
            "A/cm²",
            format!(
                "plausible up to {MAX_PLAUSIBLE_CURRENT_DENSITY_A_CM2:.0e} A/cm² (the densest traps built reach a few 1e4 A/cm², common practice)"
            ),
            "current density beyond any electron-beam trap",
        ));
    }
    if energy_ev > MAX_NONRELATIVISTIC_ENERGY_EV {
        out.push(Warning::new(
            "beam_energy",
            energy_ev,
            "eV",
            format!(
                "the non-relativistic Lotz cross sections hold up to about {MAX_NONRELATIVISTIC_ENERGY_EV:.0} eV (γ ≤ 1.1, common practice)"
            ),
            "electron energy beyond the non-relativistic cross sections",
        ));
    }
    let limit = MAX_PERVEANCE_A_V32 * energy_ev.powf(1.5);
    if current_a > limit {
        out.push(Warning::new(
            "perveance",
            current_a,
            "A",
            format!(
                "a gun delivers at most about I = 2 µA/V^1.5 × U^1.5 = {limit:.4e} A at U = {energy_ev:.0} V (practical perveance limit, common practice)"
            ),
            "beam current above the gun's practical perveance limit",
        ));
    }
    out
}

/// Warnings about a source's settings (beam trap: the beam; the note on a Brillouin radius
/// used without the cathode's parameters).
pub fn source_warnings(source: &SourceSettings) -> Vec<Warning> {
    if let SourceSettings::Plasma(p) = source {
        return plasma_warnings(p);
    }
    let SourceSettings::BeamTrap(t) = source else {
        return Vec::new();
    };
    let mut out = match t.beam() {
        Ok(b) => beam_warnings(b.energy_ev, b.current_a, b.radius_m),
        Err(_) => Vec::new(),
    };
    if let Some(w) = brillouin_settings_note(t) {
        out.push(w);
    }
    out
}

/// A plasma's electron temperatures (cold and hot) beyond the non-relativistic Maxwellian
/// rate coefficients of the plasma model (kT_e ≲ 50 keV, its module documentation).
fn plasma_warnings(p: &crate::sources::plasma::PlasmaSettings) -> Vec<Warning> {
    let hot = p
        .hot_electron_temperature_ev
        .filter(|_| p.hot_electron_fraction > 0.0);
    [Some(p.electron_temperature_ev), hot]
        .into_iter()
        .flatten()
        .filter(|t| *t > MAX_NONRELATIVISTIC_ENERGY_EV)
        .map(|t| {
            Warning::new(
                "electron_temperature",
                t,
                "eV",
                format!(
                    "the plasma's Maxwellian rate coefficients are non-relativistic, made for kT_e up to {MAX_NONRELATIVISTIC_ENERGY_EV} eV"
                ),
                "an electron temperature beyond the plasma model's range",
            )
        })
        .collect()
}

fn brillouin_settings_note(t: &BeamTrapSettings) -> Option<Warning> {
    let brillouin_only = t.radius_m.is_none()
        && t.current_density_a_cm2.is_none()
        && t.magnetic_field_t.is_some()
        && (t.cathode_radius_m.is_none() || t.cathode_temperature_k.is_none());
    if !brillouin_only {
        return None;
    }
    Some(brillouin_note(t.beam().ok()?.radius_m))
}

/// The note on a beam sized by its Brillouin radius `radius_m` alone.
pub fn brillouin_note(radius_m: f64) -> Warning {
    Warning::new(
        "brillouin_radius",
        radius_m,
        "m",
        "real beams are several times wider: give cathode_radius_m and cathode_temperature_k for Herrmann's radius (G. Herrmann, J. Appl. Phys. 29, 127 (1958))".into(),
        "note: the beam radius is the Brillouin radius, without Herrmann's correction",
    )
}

/// The energy (eV) a source needs to make `charge`+ of `element`: the last step's
/// ionization energy for stepwise sources, the sum for a single collision.
pub fn energy_needed_ev(source: &SourceSettings, element: &Element, charge: u32) -> f64 {
    let ies = element.ionization_energies_ev();
    let q = charge as usize;
    match source {
        SourceSettings::ElectronImpact(_) => ies.iter().take(q).sum(),
        _ => ies.get(q.saturating_sub(1)).copied().unwrap_or(0.0),
    }
}

/// Warning when the source's energy cannot make the target charge state (not for a plasma:
/// the tail of a Maxwellian ionizes above any threshold).
pub fn threshold_warning(s: &Scenario) -> Option<Warning> {
    if let SourceSettings::Plasma(_) = s.source {
        return None;
    }
    let el = s.target.element();
    let need = energy_needed_ev(&s.source, el, s.target.charge);
    let e = s.source.energy_ev();
    (e < need).then(|| {
        Warning::new(
            "target_threshold",
            e,
            "eV",
            format!("{} needs at least {need:.1} eV", s.target.label()),
            "the target cannot form at this beam energy",
        )
    })
}

/// Warning when the target is already over-bred at the first time point: its fraction
/// falls from the start and the mean charge is above it.
pub fn time_grid_warning(
    s: &Scenario,
    first_time_s: f64,
    peak_time_s: f64,
    mean_charge_at_start: f64,
) -> Option<Warning> {
    let q = f64::from(s.target.charge);
    (peak_time_s <= first_time_s && mean_charge_at_start > q).then(|| {
        Warning::new(
            "time_grid",
            first_time_s,
            "s",
            format!(
                "the mean charge is already {mean_charge_at_start:.1} > {q} at the first time: lower [time] start_s (start earlier)"
            ),
            "the time grid starts after the target has been over-bred",
        )
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn whats(w: &[Warning]) -> Vec<&str> {
        w.iter().map(|w| w.what).collect()
    }

    #[test]
    fn a_typical_charge_breeder_beam_passes() {
        // 0.5 A at 5 keV in a 250 µm radius: 255 A/cm², 0.5 A below 2e-6·5000^1.5 = 0.71 A.
        assert!(beam_warnings(5000.0, 0.5, 250e-6).is_empty());
    }

    #[test]
    fn each_beam_warning_fires_on_its_case_and_names_value_and_range() {
        // 1 A in 1 nm: 3.2e13 A/cm².
        let w = beam_warnings(5000.0, 1e-3, 1e-9);
        assert_eq!(whats(&w), ["current_density"]);
        assert!(w[0].message.contains("1e5") && w[0].message.contains("A/cm²"));
        let w = beam_warnings(1e9, 1.0, 1e-3);
        assert_eq!(whats(&w), ["beam_energy"]);
        assert!(w[0].range.contains("50000 eV"));
        // 1e6 A at 10 keV: far above 2e-6·1e4^1.5 = 2 A; also 3.2e9 A/cm² in 1 cm.
        let w = beam_warnings(1e4, 1e6, 1e-2);
        assert_eq!(whats(&w), ["current_density", "perveance"]);
        assert!(w[1].range.contains("2.0000e0 A"), "{}", w[1].range);
    }
}

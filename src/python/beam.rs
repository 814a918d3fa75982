//! Bindings of the electron beam: the ElectronBeam class and the beam formulas (speed,
//! Brillouin and Herrmann radii, space-charge depression, electrons in the trap).

use pyo3::prelude::*;

use super::convert::{float_arg, opt_float_arg};
use crate::sources::electron_beam::{
    checked_brillouin_radius_m, effective_energy_ev, electron_speed_m_s, electrons_in_trap,
    BeamSize, ElectronBeam,
};

/// A uniform electron beam.
///
/// Give the electron energy (eV), the current (A) and exactly one of ``radius_m``,
/// ``current_density_a_cm2`` or ``magnetic_field_t`` (the beam then has its Brillouin radius;
/// with ``cathode_radius_m`` and ``cathode_temperature_k`` (K), and optionally
/// ``cathode_field_t``, its Herrmann radius enclosing 80 % of the current).
/// ``energy_spread_ev`` (FWHM, eV, ≥ 0) sets the electrons' energy spread, which folds the
/// dielectronic resonances in a trap; by default a trap takes the space-charge width
/// (1 − f)·I/(4πε₀v) of the beam at its compensation f.
///
/// Examples
/// --------
/// >>> import chargecast as cc
/// >>> beam = cc.ElectronBeam(energy_ev=10000.0, current_a=0.5, radius_m=50e-6)
/// >>> round(beam.current_density_a_cm2)
/// 6366
/// >>> round(beam.speed_m_s / 299792458.0, 4)
/// 0.195
/// >>> round(beam.space_charge_depression_v(5e-3))  # volts, axis to wall
/// 785
#[pyclass(name = "ElectronBeam", module = "chargecast", frozen)]
#[derive(Clone)]
pub(crate) struct PyElectronBeam {
    pub(crate) inner: ElectronBeam,
}

#[pymethods]
impl PyElectronBeam {
    #[new]
    #[pyo3(signature = (energy_ev, current_a, *, radius_m=None, current_density_a_cm2=None, magnetic_field_t=None,
                        cathode_radius_m=None, cathode_temperature_k=None, cathode_field_t=None,
                        energy_spread_ev=None))]
    #[allow(clippy::too_many_arguments)]
    fn new(
        py: Python<'_>,
        energy_ev: &Bound<'_, PyAny>,
        current_a: &Bound<'_, PyAny>,
        radius_m: Option<&Bound<'_, PyAny>>,
        current_density_a_cm2: Option<&Bound<'_, PyAny>>,
        magnetic_field_t: Option<&Bound<'_, PyAny>>,
        cathode_radius_m: Option<&Bound<'_, PyAny>>,
        cathode_temperature_k: Option<&Bound<'_, PyAny>>,
        cathode_field_t: Option<&Bound<'_, PyAny>>,
        energy_spread_ev: Option<&Bound<'_, PyAny>>,
    ) -> PyResult<Self> {
        let energy_ev = float_arg("energy_ev", energy_ev)?;
        let current_a = float_arg("current_a", current_a)?;
        let radius_m = opt_float_arg("radius_m", radius_m)?;
        let current_density_a_cm2 = opt_float_arg("current_density_a_cm2", current_density_a_cm2)?;
        let magnetic_field_t = opt_float_arg("magnetic_field_t", magnetic_field_t)?;
        let cathode_radius_m = opt_float_arg("cathode_radius_m", cathode_radius_m)?;
        let cathode_temperature_k = opt_float_arg("cathode_temperature_k", cathode_temperature_k)?;
        let cathode_field_t = opt_float_arg("cathode_field_t", cathode_field_t)?;
        let size = BeamSize::from_fields(
            radius_m,
            current_density_a_cm2,
            magnetic_field_t,
            cathode_radius_m,
            cathode_temperature_k,
            cathode_field_t,
        )?;
        let energy_spread_ev = opt_float_arg("energy_spread_ev", energy_spread_ev)?;
        let inner =
            ElectronBeam::new(energy_ev, current_a, size)?.with_energy_spread(energy_spread_ev)?;
        // Plausibility warnings, one definition in the core (plan::warnings).
        let mut warnings =
            crate::plan::warnings::beam_warnings(inner.energy_ev, inner.current_a, inner.radius_m);
        if magnetic_field_t.is_some() && cathode_radius_m.is_none() {
            warnings.push(crate::plan::warnings::brillouin_note(inner.radius_m));
        }
        super::errors::warn_all(py, &warnings)?;
        Ok(PyElectronBeam { inner })
    }
    #[getter]
    fn energy_ev(&self) -> f64 {
        self.inner.energy_ev
    }
    #[getter]
    fn current_a(&self) -> f64 {
        self.inner.current_a
    }
    #[getter]
    fn radius_m(&self) -> f64 {
        self.inner.radius_m
    }
    #[getter]
    fn current_density_a_cm2(&self) -> f64 {
        self.inner.current_density_a_cm2
    }
    /// Energy spread (FWHM, eV) given to the beam, or None (a trap's space-charge default).
    #[getter]
    fn energy_spread_ev(&self) -> Option<f64> {
        self.inner.energy_spread_ev
    }
    #[getter]
    fn speed_m_s(&self) -> f64 {
        self.inner.speed_m_s()
    }
    #[getter]
    fn electron_flux_per_cm2_s(&self) -> f64 {
        self.inner.electron_flux_per_cm2_s()
    }
    /// Space-charge potential depression axis-to-wall (V) in a drift tube of radius (m).
    fn space_charge_depression_v(&self, drift_tube_radius_m: &Bound<'_, PyAny>) -> PyResult<f64> {
        let drift_tube_radius_m = float_arg("drift_tube_radius_m", drift_tube_radius_m)?;
        Ok(self.inner.depression_in_tube_v(drift_tube_radius_m)?)
    }
    fn __repr__(&self) -> String {
        self.repr()
    }
}

impl PyElectronBeam {
    pub(crate) fn repr(&self) -> String {
        format!(
            "ElectronBeam(energy_ev={}, current_a={}, radius_m={:.4e}, current_density_a_cm2={:.4e})",
            self.inner.energy_ev, self.inner.current_a, self.inner.radius_m, self.inner.current_density_a_cm2
        )
    }
}

type Arg<'a, 'py> = &'a Bound<'py, PyAny>;

#[pyfunction]
fn _electron_speed_m_s(energy_ev: Arg) -> PyResult<f64> {
    let energy_ev = float_arg("energy_ev", energy_ev)?;
    crate::error::require_positive("energy_ev", energy_ev)?;
    Ok(electron_speed_m_s(energy_ev))
}

#[pyfunction]
fn _brillouin_radius_m(current_a: Arg, energy_ev: Arg, magnetic_field_t: Arg) -> PyResult<f64> {
    Ok(checked_brillouin_radius_m(
        float_arg("current_a", current_a)?,
        float_arg("energy_ev", energy_ev)?,
        float_arg("magnetic_field_t", magnetic_field_t)?,
    )?)
}

#[pyfunction]
fn _herrmann_radius_m(
    current_a: Arg,
    energy_ev: Arg,
    magnetic_field_t: Arg,
    cathode_radius_m: Arg,
    cathode_temperature_k: Arg,
    cathode_field_t: Arg,
) -> PyResult<f64> {
    // with_herrmann validates every input before the radius is computed.
    let beam = ElectronBeam::with_herrmann(
        float_arg("energy_ev", energy_ev)?,
        float_arg("current_a", current_a)?,
        float_arg("magnetic_field_t", magnetic_field_t)?,
        float_arg("cathode_radius_m", cathode_radius_m)?,
        float_arg("cathode_temperature_k", cathode_temperature_k)?,
        float_arg("cathode_field_t", cathode_field_t)?,
    )?;
    Ok(beam.radius_m)
}

#[pyfunction]
fn _effective_energy_ev(
    tube_to_cathode_v: Arg,
    current_a: Arg,
    beam_radius_m: Arg,
    drift_tube_radius_m: Arg,
    compensation: Arg,
) -> PyResult<f64> {
    Ok(effective_energy_ev(
        float_arg("tube_to_cathode_v", tube_to_cathode_v)?,
        float_arg("current_a", current_a)?,
        float_arg("beam_radius_m", beam_radius_m)?,
        float_arg("drift_tube_radius_m", drift_tube_radius_m)?,
        float_arg("compensation", compensation)?,
    )?)
}

#[pyfunction]
fn _electrons_in_trap(current_a: Arg, energy_ev: Arg, length_m: Arg) -> PyResult<f64> {
    let current_a = float_arg("current_a", current_a)?;
    let energy_ev = float_arg("energy_ev", energy_ev)?;
    let length_m = float_arg("length_m", length_m)?;
    crate::error::require_positive("current_a", current_a)?;
    crate::error::require_positive("energy_ev", energy_ev)?;
    crate::error::require_positive("length_m", length_m)?;
    Ok(electrons_in_trap(current_a, energy_ev, length_m))
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<PyElectronBeam>()?;
    m.add_function(wrap_pyfunction!(_electron_speed_m_s, m)?)?;
    m.add_function(wrap_pyfunction!(_brillouin_radius_m, m)?)?;
    m.add_function(wrap_pyfunction!(_herrmann_radius_m, m)?)?;
    m.add_function(wrap_pyfunction!(_effective_energy_ev, m)?)?;
    m.add_function(wrap_pyfunction!(_electrons_in_trap, m)?)?;
    Ok(())
}

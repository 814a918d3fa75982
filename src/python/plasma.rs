//! Binding of the plasma ion source and of the Maxwellian radiative-recombination and
//! charge-exchange rate coefficients: a pyclass holding the core `PlasmaSource`, built by
//! its validating constructor, with steady states crossing as `PlasmaState` results.

use numpy::{PyArray1, PyArray2};
use pyo3::prelude::*;
use pyo3::types::PyDict;

use super::convert::{array1_arg, float_arg, float_dict_arg, fmt_g, int_arg, times_arg};
use super::evolution::PyEvolution;
use super::{element_arg, guard, matrix_to_py, to_py};
use crate::atoms::Element;
use crate::error::{require_all_positive, Error};
use crate::processes::charge_exchange::charge_exchange_rate_coefficient_cm3_s as cx_rate_coefficient;
use crate::processes::gases::gas as find_gas;
use crate::processes::radiative_recombination_rate::radiative_recombination_rate_coefficients_cm3_s;
use crate::sources::beam_trap::DEFAULT_GAS_TEMPERATURE_K;
use crate::sources::plasma::{
    Confinement, PlasmaSettings, PlasmaSource, DEFAULT_CONFINEMENT_EXPONENT,
    DEFAULT_NEUTRAL_RESIDENCE_TIME_S, DEFAULT_PLASMA_ION_TEMPERATURE_EV, DEFAULT_PLASMA_VOLUME_M3,
};

/// Maxwellian Kim–Pratt radiative-recombination rate coefficient (cm³ s⁻¹) of ion `charge`.
#[pyfunction]
fn radiative_recombination_rate_coefficient_cm3_s<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    charge: &Bound<'py, PyAny>,
    temperature_ev: &Bound<'py, PyAny>,
) -> PyResult<Bound<'py, PyArray1<f64>>> {
    let el = element_arg(element)?;
    let charge = int_arg("charge", charge)?;
    let temps = array1_arg("temperature_ev", temperature_ev)?;
    let out = guard(py, || {
        radiative_recombination_rate_coefficients_cm3_s(el, charge, &temps)
    })?;
    Ok(to_py(py, out))
}

/// Müller–Salzborn charge-exchange rate coefficient σ·v̄ (cm³ s⁻¹) of ion `charge` on `gas`.
#[pyfunction]
fn charge_exchange_rate_coefficient_cm3_s<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    charge: &Bound<'py, PyAny>,
    gas: &Bound<'py, PyAny>,
    ion_temperature_ev: &Bound<'py, PyAny>,
) -> PyResult<Bound<'py, PyArray1<f64>>> {
    let el = element_arg(element)?;
    let q = int_arg("charge", charge)?;
    el.check_charge(q, el.z())?;
    if q == 0 {
        return Err(Error::invalid(
            "charge",
            q,
            &format!("the capturing ion must have charge 1..={}", el.z()),
        )
        .into());
    }
    let name: String = gas.extract().map_err(|_| {
        Error::invalid(
            "gas",
            super::convert::type_name(gas),
            "must be a gas formula such as \"O2\"",
        )
    })?;
    let target = find_gas(&name)?;
    let temps = array1_arg("ion_temperature_ev", ion_temperature_ev)?;
    require_all_positive("ion_temperature_ev", &temps)?;
    let binding = el
        .ionization_energies_ev()
        .get(q as usize - 1)
        .copied()
        .ok_or_else(|| Error::NoData {
            what: format!("ionization energy of {}{}+", el.symbol(), q - 1),
            why: "the ionization-energy chain is incomplete".into(),
        })?;
    let out = temps
        .iter()
        .map(|&t| {
            cx_rate_coefficient(
                q as u32,
                binding,
                target.ionization_energy_ev,
                t,
                el.atomic_weight_u(),
            )
        })
        .collect();
    Ok(to_py(py, out))
}

/// Steady state of one element in a plasma source.
#[pyclass(name = "PlasmaState", module = "chargecast", frozen, subclass)]
pub(crate) struct PyPlasmaState {
    element: &'static Element,
    densities_cm3: Vec<f64>,
    currents_eua: Vec<f64>,
    confinement_times_s: Vec<f64>,
    feed_atoms_per_s: f64,
    outflow_atoms_per_s: f64,
    electron_density_cm3: f64,
    residual: bool,
}

#[pymethods]
impl PyPlasmaState {
    #[new]
    fn new() -> PyResult<Self> {
        super::results::staged("PlasmaState", "PlasmaSource.steady_state()")
    }
    /// Element symbol.
    #[getter]
    fn element(&self) -> &str {
        self.element.symbol()
    }
    /// Charge states 0 … Z.
    #[getter]
    fn charges<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<i64>> {
        PyArray1::from_vec(py, (0..=i64::from(self.element.z())).collect())
    }
    /// Density n_q (cm⁻³) of each charge state.
    #[getter]
    fn densities_cm3<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.densities_cm3.clone())
    }
    /// Fraction of each charge state among all atoms of the element in the plasma.
    #[getter]
    fn fractions<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        let total: f64 = self.densities_cm3.iter().sum();
        to_py(
            py,
            self.densities_cm3
                .iter()
                .map(|n| if total > 0.0 { n / total } else { 0.0 })
                .collect(),
        )
    }
    /// Extracted current (eµA) of each charge state (0 for the neutral).
    #[getter]
    fn currents_eua<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.currents_eua.clone())
    }
    /// Confinement time τ_q (s) of each charge state (NaN for the neutral).
    #[getter]
    fn confinement_times_s<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.confinement_times_s.clone())
    }
    /// Atoms per second fed into the plasma volume.
    #[getter]
    fn feed_atoms_per_s(&self) -> f64 {
        self.feed_atoms_per_s
    }
    /// Atoms per second leaving it (neutrals pumped, ions not recycled).
    #[getter]
    fn outflow_atoms_per_s(&self) -> f64 {
        self.outflow_atoms_per_s
    }
    /// Σ q n_q / n_e: the share of the electron density this element's ions neutralise.
    #[getter]
    fn charge_density_ratio(&self) -> f64 {
        self.densities_cm3
            .iter()
            .enumerate()
            .map(|(q, n)| q as f64 * n)
            .sum::<f64>()
            / self.electron_density_cm3
    }
    /// True when the element comes only from residual gas.
    #[getter]
    fn residual(&self) -> bool {
        self.residual
    }
}

/// A plasma ion source (ECR type); see the Python class for the parameters.
#[pyclass(name = "PlasmaSource", module = "chargecast", frozen, subclass)]
pub(crate) struct PyPlasmaSource {
    pub(crate) inner: PlasmaSource,
}

fn confinement_arg(value: &Bound<'_, PyAny>, exponent: f64) -> PyResult<Confinement> {
    if let Ok(t) = float_arg("confinement_time_s", value) {
        return Ok(Confinement::Scaling {
            tau1_s: t,
            exponent,
        });
    }
    Ok(Confinement::PerCharge(array1_arg(
        "confinement_time_s",
        value,
    )?))
}

impl PyPlasmaSource {
    fn label(&self) -> String {
        let s = self.inner.settings();
        format!(
            "plasma kT_e {} eV, n_e {} cm⁻³",
            fmt_g(s.electron_temperature_ev, 4),
            fmt_g(s.electron_density_cm3, 3)
        )
    }
}

#[pymethods]
impl PyPlasmaSource {
    #[new]
    #[pyo3(signature = (*, electron_temperature_ev, electron_density_cm3, confinement_time_s, gas_feed_pa,
                        confinement_exponent=None, residual_gas_pa=None,
                        hot_electron_temperature_ev=None, hot_electron_fraction=None,
                        ion_temperature_ev=None, gas_temperature_k=None,
                        neutral_residence_time_s=None, wall_recycling=None, plasma_volume_m3=None,
                        extraction_fraction=None))]
    #[allow(clippy::too_many_arguments)]
    fn new(
        electron_temperature_ev: &Bound<'_, PyAny>,
        electron_density_cm3: &Bound<'_, PyAny>,
        confinement_time_s: &Bound<'_, PyAny>,
        gas_feed_pa: &Bound<'_, PyAny>,
        confinement_exponent: Option<&Bound<'_, PyAny>>,
        residual_gas_pa: Option<&Bound<'_, PyAny>>,
        hot_electron_temperature_ev: Option<&Bound<'_, PyAny>>,
        hot_electron_fraction: Option<&Bound<'_, PyAny>>,
        ion_temperature_ev: Option<&Bound<'_, PyAny>>,
        gas_temperature_k: Option<&Bound<'_, PyAny>>,
        neutral_residence_time_s: Option<&Bound<'_, PyAny>>,
        wall_recycling: Option<&Bound<'_, PyAny>>,
        plasma_volume_m3: Option<&Bound<'_, PyAny>>,
        extraction_fraction: Option<&Bound<'_, PyAny>>,
    ) -> PyResult<Self> {
        let opt = |name: &str, v: Option<&Bound<'_, PyAny>>, default: f64| -> PyResult<f64> {
            Ok(super::convert::opt_float_arg(name, v)?.unwrap_or(default))
        };
        let exponent = opt(
            "confinement_exponent",
            confinement_exponent,
            DEFAULT_CONFINEMENT_EXPONENT,
        )?;
        let feed = float_dict_arg(
            "gas_feed_pa",
            Some(gas_feed_pa),
            "must be a dict {formula: pressure_pa}",
        )?;
        let mut s = PlasmaSettings::new(
            float_arg("electron_temperature_ev", electron_temperature_ev)?,
            float_arg("electron_density_cm3", electron_density_cm3)?,
            confinement_arg(confinement_time_s, exponent)?,
            feed,
        );
        s.residual_gas_pa = float_dict_arg(
            "residual_gas_pa",
            residual_gas_pa,
            "must be a dict {formula: pressure_pa}",
        )?;
        s.hot_electron_temperature_ev = super::convert::opt_float_arg(
            "hot_electron_temperature_ev",
            hot_electron_temperature_ev,
        )?;
        s.hot_electron_fraction = opt("hot_electron_fraction", hot_electron_fraction, 0.0)?;
        s.ion_temperature_ev = opt(
            "ion_temperature_ev",
            ion_temperature_ev,
            DEFAULT_PLASMA_ION_TEMPERATURE_EV,
        )?;
        s.gas_temperature_k = opt(
            "gas_temperature_k",
            gas_temperature_k,
            DEFAULT_GAS_TEMPERATURE_K,
        )?;
        s.neutral_residence_time_s = opt(
            "neutral_residence_time_s",
            neutral_residence_time_s,
            DEFAULT_NEUTRAL_RESIDENCE_TIME_S,
        )?;
        s.wall_recycling = opt("wall_recycling", wall_recycling, 0.0)?;
        s.plasma_volume_m3 = opt(
            "plasma_volume_m3",
            plasma_volume_m3,
            DEFAULT_PLASMA_VOLUME_M3,
        )?;
        s.extraction_fraction = opt("extraction_fraction", extraction_fraction, 1.0)?;
        Ok(PyPlasmaSource {
            inner: PlasmaSource::new(s)?,
        })
    }

    /// Cold electron temperature kT_e (eV).
    #[getter]
    fn electron_temperature_ev(&self) -> f64 {
        self.inner.settings().electron_temperature_ev
    }
    /// Electron density n_e (cm⁻³).
    #[getter]
    fn electron_density_cm3(&self) -> f64 {
        self.inner.settings().electron_density_cm3
    }
    /// τ₁ (s) of the scaling τ_q = τ₁·q^α, or the per-charge times (charge 1, 2, …).
    #[getter]
    fn confinement_time_s<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyAny>> {
        Ok(match &self.inner.settings().confinement {
            Confinement::Scaling { tau1_s, .. } => tau1_s.into_pyobject(py)?.into_any(),
            Confinement::PerCharge(t) => to_py(py, t.clone()).into_any(),
        })
    }
    /// α of τ_q = τ₁·q^α (None when times are given per charge).
    #[getter]
    fn confinement_exponent(&self) -> Option<f64> {
        match &self.inner.settings().confinement {
            Confinement::Scaling { exponent, .. } => Some(*exponent),
            Confinement::PerCharge(_) => None,
        }
    }
    /// Fed gases and their partial pressures (Pa).
    #[getter]
    fn gas_feed_pa<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyDict>> {
        let d = PyDict::new(py);
        for (g, p) in &self.inner.settings().gas_feed_pa {
            d.set_item(find_gas(g)?.formula, p)?;
        }
        Ok(d)
    }
    /// Residual gases and their partial pressures (Pa).
    #[getter]
    fn residual_gas_pa<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyDict>> {
        let d = PyDict::new(py);
        for (g, p) in &self.inner.settings().residual_gas_pa {
            d.set_item(find_gas(g)?.formula, p)?;
        }
        Ok(d)
    }
    /// Hot electron temperature kT_h (eV), or None.
    #[getter]
    fn hot_electron_temperature_ev(&self) -> Option<f64> {
        self.inner.settings().hot_electron_temperature_ev
    }
    /// Fraction of the electrons in the hot population.
    #[getter]
    fn hot_electron_fraction(&self) -> f64 {
        self.inner.settings().hot_electron_fraction
    }
    /// Ion temperature kT_i (eV).
    #[getter]
    fn ion_temperature_ev(&self) -> f64 {
        self.inner.settings().ion_temperature_ev
    }
    /// Gas temperature (K).
    #[getter]
    fn gas_temperature_k(&self) -> f64 {
        self.inner.settings().gas_temperature_k
    }
    /// Neutral residence time τ₀ (s).
    #[getter]
    fn neutral_residence_time_s(&self) -> f64 {
        self.inner.settings().neutral_residence_time_s
    }
    /// Fraction of lost ions returning as neutrals.
    #[getter]
    fn wall_recycling(&self) -> f64 {
        self.inner.settings().wall_recycling
    }
    /// Plasma volume (m³).
    #[getter]
    fn plasma_volume_m3(&self) -> f64 {
        self.inner.settings().plasma_volume_m3
    }
    /// Fraction of lost ions reaching the extraction.
    #[getter]
    fn extraction_fraction(&self) -> f64 {
        self.inner.settings().extraction_fraction
    }
    /// Element symbols the gases bring, feed first.
    #[getter]
    fn elements(&self) -> Vec<String> {
        self.inner
            .species()
            .iter()
            .map(|s| s.element.symbol().to_string())
            .collect()
    }
    /// Symbols of the elements that come only from residual gas.
    #[getter]
    fn residual_elements(&self) -> Vec<String> {
        self.inner
            .species()
            .iter()
            .filter(|s| s.residual)
            .map(|s| s.element.symbol().to_string())
            .collect()
    }

    /// Steady state of `element` (a PlasmaState).
    fn steady_state<'py>(
        &self,
        py: Python<'py>,
        element: &Bound<'py, PyAny>,
    ) -> PyResult<Bound<'py, PyAny>> {
        let el = element_arg(element)?;
        let p = &self.inner;
        let value = guard(py, || {
            let densities = p.steady_state(el)?;
            let currents = p.currents_eua(&densities)?;
            let taus = (0..=el.z())
                .map(|q| {
                    if q == 0 {
                        Ok(f64::NAN)
                    } else {
                        p.confinement_time_s(q)
                    }
                })
                .collect::<crate::error::Result<Vec<_>>>()?;
            Ok(PyPlasmaState {
                element: el,
                feed_atoms_per_s: p.feed_atoms_per_s(el)?,
                outflow_atoms_per_s: p.outflow_atoms_per_s(&densities)?,
                residual: p.species_of(el)?.residual,
                densities_cm3: densities,
                currents_eua: currents,
                confinement_times_s: taus,
                electron_density_cm3: p.settings().electron_density_cm3,
            })
        })?;
        super::results::into_result(py, "PlasmaState", value)
    }

    /// Charge-state fractions after switch-on (an Evolution).
    fn evolve<'py>(
        &self,
        py: Python<'py>,
        element: &Bound<'py, PyAny>,
        times_s: &Bound<'py, PyAny>,
    ) -> PyResult<Bound<'py, PyAny>> {
        let el = element_arg(element)?;
        let times = times_arg(times_s)?;
        let out = guard(py, || self.inner.evolve(el, &times, 0))?;
        PyEvolution::result(py, el, times, out, self.label())
    }

    /// Densities n_q (cm⁻³) after switch-on, [T, Z+1].
    fn evolve_densities_cm3<'py>(
        &self,
        py: Python<'py>,
        element: &Bound<'py, PyAny>,
        times_s: &Bound<'py, PyAny>,
    ) -> PyResult<Bound<'py, PyArray2<f64>>> {
        let el = element_arg(element)?;
        let times = times_arg(times_s)?;
        let out = guard(py, || self.inner.evolve_densities(el, &times))?;
        Ok(matrix_to_py(py, out))
    }

    /// The element's rate matrix ``rates[from, to]`` (s⁻¹).
    fn rates<'py>(
        &self,
        py: Python<'py>,
        element: &Bound<'py, PyAny>,
    ) -> PyResult<Bound<'py, PyArray2<f64>>> {
        let el = element_arg(element)?;
        let net = guard(py, || self.inner.network(el))?;
        Ok(matrix_to_py(py, net.rate_matrix()))
    }
}

/// The core's note for an over-fed plasma (ions' charge density above the electrons'), or
/// None; ``PlasmaSource.steady_states`` warns with it.
#[pyfunction]
fn _quasi_neutrality_note(
    ion_charge_density_cm3: f64,
    electron_density_cm3: f64,
) -> Option<String> {
    crate::sources::plasma::quasi_neutrality_note(ion_charge_density_cm3, electron_density_cm3, "")
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(_quasi_neutrality_note, m)?)?;
    m.add_class::<PyPlasmaSource>()?;
    m.add_class::<PyPlasmaState>()?;
    m.add_function(wrap_pyfunction!(
        radiative_recombination_rate_coefficient_cm3_s,
        m
    )?)?;
    m.add_function(wrap_pyfunction!(charge_exchange_rate_coefficient_cm3_s, m)?)?;
    Ok(())
}

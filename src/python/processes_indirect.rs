//! Bindings of the indirect and resonant electron-impact processes: all single-ionization
//! channels (Lotz + excitation–autoionization), the EA cross section and rate coefficient,
//! the dielectronic resonances of an ion, their beam-folded cross section and the Maxwellian
//! DR rate coefficient (Burgess 1965).

use numpy::PyArray1;
use pyo3::prelude::*;

use super::atoms::{constants, Arg};
use super::convert::{float_arg, int_arg, per_ion_array};
use super::{element_arg, guard, to_py};
use crate::error::require_all_positive;
use crate::processes::dielectronic::{
    beam_cross_sections_cm2, rate_coefficient_cm3_s as dr_rate, resonances, DrResonance,
};
use crate::processes::excitation_autoionization::{
    cross_sections_cm2 as ea_cross_sections, rate_coefficient_cm3_s as ea_rate,
    single_ionization_cross_sections_cm2,
};
use crate::processes::ion_lotz::ionizable_ion;

#[pyfunction]
#[pyo3(signature = (element, charge, energies_ev, a=None, b=None, c=None))]
fn ionization_cross_section_cm2<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    charge: &Bound<'py, PyAny>,
    energies_ev: &Bound<'py, PyAny>,
    a: Arg<'_, 'py>,
    b: Arg<'_, 'py>,
    c: Arg<'_, 'py>,
) -> PyResult<Bound<'py, PyArray1<f64>>> {
    let k = constants(a, b, c)?;
    per_ion_array(
        py,
        element,
        charge,
        ("energies_ev", energies_ev),
        |el, q, e| single_ionization_cross_sections_cm2(el, q, e, k),
    )
}

#[pyfunction]
fn excitation_autoionization_cross_section_cm2<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    charge: &Bound<'py, PyAny>,
    energies_ev: &Bound<'py, PyAny>,
) -> PyResult<Bound<'py, PyArray1<f64>>> {
    per_ion_array(
        py,
        element,
        charge,
        ("energies_ev", energies_ev),
        |el, q, e| {
            require_all_positive("energies_ev", e)?;
            Ok(ea_cross_sections(&ionizable_ion(el, q)?, e))
        },
    )
}

#[pyfunction]
fn excitation_autoionization_rate_coefficient_cm3_s<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    charge: &Bound<'py, PyAny>,
    temperatures_ev: &Bound<'py, PyAny>,
) -> PyResult<Bound<'py, PyArray1<f64>>> {
    per_ion_array(
        py,
        element,
        charge,
        ("temperatures_ev", temperatures_ev),
        |el, q, t| {
            let ion = ionizable_ion(el, q)?;
            t.iter().map(|t| ea_rate(&ion, *t)).collect()
        },
    )
}

#[pyfunction]
fn dielectronic_rate_coefficient_cm3_s<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    charge: &Bound<'py, PyAny>,
    temperatures_ev: &Bound<'py, PyAny>,
) -> PyResult<Bound<'py, PyArray1<f64>>> {
    per_ion_array(
        py,
        element,
        charge,
        ("temperatures_ev", temperatures_ev),
        |el, q, t| {
            let ion = el.ion(q)?;
            t.iter().map(|t| dr_rate(&ion, *t)).collect()
        },
    )
}

#[pyfunction]
fn dielectronic_cross_section_cm2<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    charge: &Bound<'py, PyAny>,
    energies_ev: &Bound<'py, PyAny>,
    energy_spread_ev: &Bound<'py, PyAny>,
) -> PyResult<Bound<'py, PyArray1<f64>>> {
    let spread = float_arg("energy_spread_ev", energy_spread_ev)?;
    per_ion_array(
        py,
        element,
        charge,
        ("energies_ev", energies_ev),
        |el, q, e| {
            require_all_positive("energies_ev", e)?;
            beam_cross_sections_cm2(&el.ion(q)?, e, spread)
        },
    )
}

/// The dielectronic resonance groups of one recombining ion, one entry per core
/// excitation and capture shell, sorted by energy.
#[pyclass(name = "DrResonances", module = "chargecast", frozen, subclass)]
pub(crate) struct PyDrResonances {
    symbol: String,
    charge: u32,
    list: Vec<DrResonance>,
}

#[pymethods]
impl PyDrResonances {
    #[new]
    fn new() -> PyResult<Self> {
        super::results::staged("DrResonances", "chargecast.dr_resonances")
    }
    /// Element symbol.
    #[getter]
    fn element(&self) -> &str {
        &self.symbol
    }
    /// Charge of the recombining ion.
    #[getter]
    fn charge(&self) -> u32 {
        self.charge
    }
    /// Resonance energies E_r of the free electron (eV).
    #[getter]
    fn energies_ev<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.list.iter().map(|r| r.energy_ev).collect())
    }
    /// Resonance strengths (cm² eV).
    #[getter]
    fn strengths_cm2_ev<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.list.iter().map(|r| r.strength_cm2_ev).collect())
    }
    /// Natural widths ħ·(total decay rate) (eV).
    #[getter]
    fn natural_widths_ev<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.list.iter().map(|r| r.natural_width_ev).collect())
    }
    /// Principal quantum number of the captured electron's shell.
    #[getter]
    fn capture_shells(&self) -> Vec<u32> {
        self.list.iter().map(|r| r.capture_n).collect()
    }
    /// Subshell label of the excited core electron ("1s", "2p", …).
    #[getter]
    fn core_subshells(&self) -> Vec<String> {
        self.list
            .iter()
            .map(|r| {
                crate::atoms::Subshell {
                    n: r.core_from_n,
                    l: r.core_from_l,
                }
                .label()
            })
            .collect()
    }
    /// Shell the core electron is lifted to.
    #[getter]
    fn core_shells(&self) -> Vec<u32> {
        self.list.iter().map(|r| r.core_to_n).collect()
    }
    fn __len__(&self) -> usize {
        self.list.len()
    }
}

#[pyfunction]
fn dr_resonances<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    charge: &Bound<'py, PyAny>,
) -> PyResult<Bound<'py, PyAny>> {
    let el = element_arg(element)?;
    let charge = int_arg("charge", charge)?;
    let (ion, list) = guard(py, || {
        let ion = el.ion(charge)?;
        Ok((ion, resonances(&ion)))
    })?;
    let value = PyDrResonances {
        symbol: el.symbol().to_string(),
        charge: ion.charge,
        list: list.to_vec(),
    };
    super::results::into_result(py, "DrResonances", value)
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<PyDrResonances>()?;
    m.add_function(wrap_pyfunction!(ionization_cross_section_cm2, m)?)?;
    m.add_function(wrap_pyfunction!(
        excitation_autoionization_cross_section_cm2,
        m
    )?)?;
    m.add_function(wrap_pyfunction!(
        excitation_autoionization_rate_coefficient_cm3_s,
        m
    )?)?;
    m.add_function(wrap_pyfunction!(dielectronic_rate_coefficient_cm3_s, m)?)?;
    m.add_function(wrap_pyfunction!(dielectronic_cross_section_cm2, m)?)?;
    m.add_function(wrap_pyfunction!(dr_resonances, m)?)?;
    Ok(())
}

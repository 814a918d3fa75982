//! Bindings of the atoms layer and of electron-impact ionization: elements, ions,
//! Lotz cross sections and rate coefficients, stepwise breeding.

use numpy::PyArray1;
use pyo3::prelude::*;
use pyo3::types::PyDict;

use super::convert::{float_arg, int_arg, opt_float_arg, per_ion_array};
use super::{element_arg, guard, to_py};
use crate::atoms::{Element, Ion};
use crate::processes::ion_lotz::{
    ionization_cross_sections_cm2, ionization_rate_coefficients_cm3_s, peak_energy_ev,
};
use crate::processes::lotz::LotzConstants;
use crate::sources::breeding::{breeding_ladder, breeding_times_s};

/// A chemical element: ionization energies, ions, isotopes and X-ray levels.
///
/// Get one with ``chargecast.element(symbol, name or Z)``. ``ionization_energies_ev[q]``
/// is the energy (eV) to go from charge q to q+1 (NIST ASD); ``ion(q)`` gives charge state q
/// (0 = neutral … Z = bare); ``isotopes()`` lists (mass_number, mass_u, abundance or None);
/// ``xray_levels()`` lists the neutral atom's edges (edge, subshell, binding_ev, jump_ratio,
/// fluorescence_yield).
///
/// Examples
/// --------
/// >>> import chargecast as cc
/// >>> ar = cc.element("argon")
/// >>> ar.z, ar.symbol, len(ar.ionization_energies_ev)
/// (18, 'Ar', 18)
/// >>> ar.configuration(8)
/// '1s2.2s2.2p6'
#[pyclass(name = "Element", module = "chargecast", frozen)]
pub(crate) struct PyElement {
    pub(crate) inner: &'static Element,
}

#[pymethods]
impl PyElement {
    #[getter]
    fn z(&self) -> u32 {
        self.inner.z()
    }
    #[getter]
    fn symbol(&self) -> &str {
        self.inner.symbol()
    }
    #[getter]
    fn name(&self) -> &str {
        self.inner.name()
    }
    #[getter]
    fn atomic_weight_u(&self) -> f64 {
        self.inner.atomic_weight_u()
    }
    #[getter]
    fn ionization_energies_ev<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.inner.ionization_energies_ev().to_vec())
    }
    #[getter]
    fn ionization_uncertainties_ev<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.inner.ionization_uncertainties_ev().to_vec())
    }
    #[getter]
    fn ionization_energy_kinds(&self) -> Vec<&'static str> {
        self.inner
            .ionization_energy_kinds()
            .iter()
            .map(|k| k.label())
            .collect()
    }
    #[getter]
    fn is_complete(&self) -> bool {
        self.inner.is_complete()
    }
    /// The ion of charge ``charge`` (0 = neutral … Z = bare).
    fn ion(&self, charge: &Bound<'_, PyAny>) -> PyResult<PyIon> {
        Ok(PyIon {
            inner: self.inner.ion(int_arg("charge", charge)?)?,
        })
    }
    /// Ground configuration of charge ``charge``, cores written out (e.g. ``'1s2.2s2.2p6'``).
    fn configuration(&self, charge: &Bound<'_, PyAny>) -> PyResult<String> {
        Ok(self
            .inner
            .ion(int_arg("charge", charge)?)?
            .configuration()
            .label())
    }
    /// Every isotope with a measured mass: ``mass_number``, ``mass_u``, ``abundance`` (None
    /// for isotopes without a natural abundance).
    fn isotopes(&self) -> Vec<PyIsotope> {
        self.inner
            .isotopes()
            .iter()
            .map(PyIsotope::from_core)
            .collect()
    }
    /// The isotope of mass number ``mass_number``: mass, abundance, half-life and decay
    /// channels.
    fn isotope(&self, mass_number: &Bound<'_, PyAny>) -> PyResult<PyIsotope> {
        let a = int_arg("mass_number", mass_number)?;
        let a = u32::try_from(a).map_err(|_| {
            crate::error::Error::invalid("mass_number", a, "must be a positive whole number")
        })?;
        Ok(PyIsotope::from_core(self.inner.isotope(a)?))
    }
    /// X-ray absorption edges of the neutral atom: ``edge``, ``subshell``, ``binding_ev``,
    /// ``jump_ratio``, ``fluorescence_yield``.
    fn xray_levels(&self) -> Vec<PyXrayLevel> {
        self.inner
            .xray_levels()
            .iter()
            .map(|l| PyXrayLevel {
                edge: l.edge.clone(),
                subshell: l.subshell.label(),
                binding_ev: l.binding_ev,
                jump_ratio: l.jump_ratio,
                fluorescence_yield: l.fluorescence_yield,
            })
            .collect()
    }
    fn __repr__(&self) -> String {
        format!("Element({:?}, z={})", self.inner.symbol(), self.inner.z())
    }
    fn __eq__(&self, other: &Bound<'_, PyAny>) -> bool {
        other
            .cast::<PyElement>()
            .map(|o| o.get().inner.z() == self.inner.z())
            .unwrap_or(false)
    }
    fn __hash__(&self) -> u64 {
        self.inner.z() as u64
    }
}

/// One isotope: mass number, atomic mass (u), natural abundance (None if not natural),
/// half-life (s; None if stable or unknown) and decay channels [(name, branching)].
#[pyclass(name = "Isotope", module = "chargecast", frozen, get_all)]
pub(crate) struct PyIsotope {
    mass_number: u32,
    mass_u: f64,
    abundance: Option<f64>,
    half_life_s: Option<f64>,
    is_radioactive: bool,
    decay_modes: Vec<(&'static str, f64)>,
}

impl PyIsotope {
    fn from_core(i: &crate::atoms::Isotope) -> Self {
        PyIsotope {
            mass_number: i.mass_number,
            mass_u: i.mass_u,
            abundance: i.abundance,
            half_life_s: i.half_life_s(),
            is_radioactive: i.decay.is_some(),
            decay_modes: i
                .decay
                .as_ref()
                .map(|d| d.modes.iter().map(|(m, f)| (m.label(), *f)).collect())
                .unwrap_or_default(),
        }
    }
}

#[pymethods]
impl PyIsotope {
    fn __repr__(&self) -> String {
        let ab = self
            .abundance
            .map(|a| a.to_string())
            .unwrap_or_else(|| "None".into());
        format!(
            "Isotope(mass_number={}, mass_u={}, abundance={ab})",
            self.mass_number, self.mass_u
        )
    }
}

/// One X-ray absorption edge of a neutral atom: edge name, subshell, binding energy (eV),
/// edge jump ratio and fluorescence yield.
#[pyclass(name = "XrayLevel", module = "chargecast", frozen, get_all)]
pub(crate) struct PyXrayLevel {
    edge: String,
    subshell: String,
    binding_ev: f64,
    jump_ratio: f64,
    fluorescence_yield: f64,
}

#[pymethods]
impl PyXrayLevel {
    fn __repr__(&self) -> String {
        format!(
            "XrayLevel(edge={:?}, subshell={:?}, binding_ev={})",
            self.edge, self.subshell, self.binding_ev
        )
    }
}

/// One charge state of an element.
///
/// ``subshells()`` lists (label, occupancy, binding_ev) of every occupied subshell, inner
/// first, with binding energies (eV) from the ion model; ``threshold_ev`` is the energy to
/// make this ion from the neutral atom; ``ionized_subshell`` is the subshell that loses the
/// next electron.
///
/// Examples
/// --------
/// >>> import chargecast as cc
/// >>> ion = cc.element("Ar").ion(8)
/// >>> ion.ionized_subshell, round(ion.ionization_energy_ev, 2)
/// ('2p', 422.6)
/// >>> [label for label, occupancy, binding_ev in ion.subshells()]
/// ['1s', '2s', '2p']
#[pyclass(name = "Ion", module = "chargecast", frozen)]
pub(crate) struct PyIon {
    inner: Ion,
}

#[pymethods]
impl PyIon {
    #[getter]
    fn element(&self) -> PyElement {
        PyElement {
            inner: self.inner.element,
        }
    }
    #[getter]
    fn charge(&self) -> u32 {
        self.inner.charge
    }
    #[getter]
    fn electrons(&self) -> u32 {
        self.inner.electrons()
    }
    #[getter]
    fn configuration(&self) -> String {
        self.inner.configuration().label()
    }
    #[getter]
    fn ionization_energy_ev(&self) -> Option<f64> {
        self.inner.ionization_energy_ev()
    }
    #[getter]
    fn threshold_ev(&self) -> f64 {
        self.inner.threshold_ev()
    }
    #[getter]
    fn ionized_subshell(&self) -> Option<String> {
        self.inner.ionized_subshell().map(|s| s.label())
    }
    #[getter]
    fn valence_shell(&self) -> (u32, u32) {
        self.inner.valence_shell()
    }
    /// [(label, occupancy, binding_ev)] of every occupied subshell, inner first.
    fn subshells(&self) -> Vec<(String, u32, f64)> {
        self.inner
            .subshells()
            .iter()
            .map(|s| (s.subshell.label(), s.occupancy, s.binding_ev))
            .collect()
    }
    fn __repr__(&self) -> String {
        format!(
            "Ion({:?}, charge={})",
            self.inner.element.symbol(),
            self.inner.charge
        )
    }
}

/// Look up an element by symbol, name or Z.
#[pyfunction]
fn element(value: &Bound<'_, PyAny>) -> PyResult<PyElement> {
    Ok(PyElement {
        inner: element_arg(value)?,
    })
}

pub(crate) type Arg<'a, 'py> = Option<&'a Bound<'py, PyAny>>;

/// Lotz constants given by the caller (None when all three are left out).
pub(crate) fn constants(a: Arg, b: Arg, c: Arg) -> PyResult<Option<LotzConstants>> {
    let a = opt_float_arg("a", a)?;
    let b = opt_float_arg("b", b)?;
    let c = opt_float_arg("c", c)?;
    if a.is_none() && b.is_none() && c.is_none() {
        return Ok(None);
    }
    let d = LotzConstants::SIMPLIFIED;
    Ok(Some(LotzConstants {
        a_cm2_ev2: a.unwrap_or(d.a_cm2_ev2),
        b: b.unwrap_or(d.b),
        c: c.unwrap_or(d.c),
    }))
}

#[pyfunction]
#[pyo3(signature = (element, charge, energies_ev, a=None, b=None, c=None))]
fn lotz_cross_section_cm2<'py>(
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
        |el, q, e| ionization_cross_sections_cm2(el, q, e, k),
    )
}

#[pyfunction]
#[pyo3(signature = (element, charge, temperatures_ev, a=None, b=None, c=None))]
fn lotz_rate_coefficient_cm3_s<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    charge: &Bound<'py, PyAny>,
    temperatures_ev: &Bound<'py, PyAny>,
    a: Arg<'_, 'py>,
    b: Arg<'_, 'py>,
    c: Arg<'_, 'py>,
) -> PyResult<Bound<'py, PyArray1<f64>>> {
    let k = constants(a, b, c)?;
    per_ion_array(
        py,
        element,
        charge,
        ("temperatures_ev", temperatures_ev),
        |el, q, t| ionization_rate_coefficients_cm3_s(el, q, t, k),
    )
}

#[pyfunction]
#[pyo3(signature = (element, charge, a=None, b=None, c=None))]
fn lotz_peak_energy_ev<'py>(
    element: &Bound<'py, PyAny>,
    charge: &Bound<'py, PyAny>,
    a: Arg<'_, 'py>,
    b: Arg<'_, 'py>,
    c: Arg<'_, 'py>,
) -> PyResult<f64> {
    let k = constants(a, b, c)?;
    Ok(peak_energy_ev(
        element_arg(element)?,
        int_arg("charge", charge)?,
        k,
    )?)
}

/// Ionization-only breeding time (s) to reach `charge`, one value per energy.
#[pyfunction]
#[pyo3(signature = (element, charge, energies_ev, current_density_a_cm2, a=None, b=None, c=None))]
#[allow(clippy::too_many_arguments)]
fn _breeding_time_s<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    charge: &Bound<'py, PyAny>,
    energies_ev: &Bound<'py, PyAny>,
    current_density_a_cm2: &Bound<'py, PyAny>,
    a: Arg<'_, 'py>,
    b: Arg<'_, 'py>,
    c: Arg<'_, 'py>,
) -> PyResult<Bound<'py, PyArray1<f64>>> {
    let current_density_a_cm2 = float_arg("current_density_a_cm2", current_density_a_cm2)?;
    let k = constants(a, b, c)?;
    per_ion_array(
        py,
        element,
        charge,
        ("energies_ev", energies_ev),
        |el, q, e| breeding_times_s(el, q, e, current_density_a_cm2, k),
    )
}

/// The breeding ladder as a dict of equal-length arrays (one entry per step q → q+1).
#[pyfunction]
#[pyo3(signature = (element, charge, energy_ev, current_density_a_cm2, a=None, b=None, c=None))]
#[allow(clippy::too_many_arguments)]
fn _breeding_ladder<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    charge: &Bound<'py, PyAny>,
    energy_ev: &Bound<'py, PyAny>,
    current_density_a_cm2: &Bound<'py, PyAny>,
    a: Arg<'_, 'py>,
    b: Arg<'_, 'py>,
    c: Arg<'_, 'py>,
) -> PyResult<Bound<'py, PyDict>> {
    let el = element_arg(element)?;
    let charge = int_arg("charge", charge)?;
    let energy_ev = float_arg("energy_ev", energy_ev)?;
    let current_density_a_cm2 = float_arg("current_density_a_cm2", current_density_a_cm2)?;
    let k = constants(a, b, c)?;
    let steps = guard(py, || {
        breeding_ladder(el, charge, energy_ev, current_density_a_cm2, k)
    })?;
    let d = PyDict::new(py);
    let col = |f: &dyn Fn(&crate::sources::breeding::BreedingStep) -> f64| -> Vec<f64> {
        steps.iter().map(f).collect()
    };
    d.set_item("charge", steps.iter().map(|s| s.charge).collect::<Vec<_>>())?;
    d.set_item(
        "ionization_energy_ev",
        to_py(py, col(&|s| s.ionization_energy_ev)),
    )?;
    d.set_item(
        "cross_section_cm2",
        to_py(py, col(&|s| s.cross_section_cm2)),
    )?;
    d.set_item("rate_per_s", to_py(py, col(&|s| s.rate_per_s)))?;
    d.set_item("time_to_next_s", to_py(py, col(&|s| s.time_to_next_s)))?;
    d.set_item("j_tau_c_cm2", to_py(py, col(&|s| s.j_tau_c_cm2)))?;
    d.set_item("peak_energy_ev", to_py(py, col(&|s| s.peak_energy_ev)))?;
    Ok(d)
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<PyElement>()?;
    m.add_class::<PyIon>()?;
    m.add_class::<PyIsotope>()?;
    m.add_class::<PyXrayLevel>()?;
    m.add_function(wrap_pyfunction!(element, m)?)?;
    m.add_function(wrap_pyfunction!(lotz_cross_section_cm2, m)?)?;
    m.add_function(wrap_pyfunction!(lotz_rate_coefficient_cm3_s, m)?)?;
    m.add_function(wrap_pyfunction!(lotz_peak_energy_ev, m)?)?;
    m.add_function(wrap_pyfunction!(_breeding_time_s, m)?)?;
    m.add_function(wrap_pyfunction!(_breeding_ladder, m)?)?;
    Ok(())
}

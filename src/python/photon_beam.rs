//! Bindings of the photon beam and of what one photon does: photoionization cross sections
//! per subshell, vacancy relaxation, one-photon thresholds and selectivity.

use numpy::{IntoPyArray, PyArray1, PyArray2};
use pyo3::prelude::*;

use super::convert::{
    array1_arg, charge_list_arg, charges_arg, float_arg, fmt_g, int_arg, times_arg,
};
use super::energy_scan::PyEnergyScan;
use super::evolution::PyEvolution;
use super::{element_arg, guard, matrix_to_py, to_py};
use crate::atoms::{Element, Subshell};
use crate::processes::photoionization::subshell_cross_sections_cm2;
use crate::processes::relaxation::{max_extra_electrons, vacancy_relaxation_with, Relaxation};
use crate::sources::photon_beam::{
    photon_network, photon_selectivity, photon_thresholds, ChargeThreshold, PhotonBeam,
    Selectivity, ThresholdRoute,
};

/// A photon beam: photon energy, flux and bandwidth.
///
/// Every ion absorbs photons at the rate Φ·σ_s(hν) per subshell s; inner-shell holes relax
/// and add charges, so the beam drives jumps q → q+1+k and the charge state builds up photon
/// after photon under high flux. Shake-off accompanying inner-shell photoionization and
/// double Auger decay are included (``multi_electron``); direct double photoionization of
/// the valence shell and non-linear absorption are not.
///
/// Parameters
/// ----------
/// photon_energy_ev : float
///     Photon energy (eV), > 0.
/// flux_cm2_s : float
///     Photon flux (photons cm⁻² s⁻¹), ≥ 0.
/// bandwidth_ev : float, optional
///     Full width at half maximum of a Gaussian spectrum (eV), ≥ 0; 0 = monochromatic.
/// multi_electron : bool, optional
///     Relax vacancies with shake-off and double Auger decay (default True); False gives the
///     one-electron cascade (fluorescence, Coster–Kronig, Auger).
///
/// Examples
/// --------
/// >>> import numpy as np
/// >>> import chargecast as cc
/// >>> beam = cc.PhotonBeam(photon_energy_ev=1500.0, flux_cm2_s=1e22)
/// >>> evo = beam.evolve("Ne", times_s=np.geomspace(1e-8, 1e-4, 30))
/// >>> evo.fractions.shape
/// (30, 11)
/// >>> int(np.argmax(beam.steady_state("Ne")))   # Ne9+ 1s binds by 1362 eV, Ne10+ is bare
/// 10
/// >>> bool(beam.rates("Ne")[0, 1] > 0)
/// True
#[pyclass(name = "PhotonBeam", module = "chargecast", frozen)]
#[derive(Clone)]
pub(crate) struct PyPhotonBeam {
    pub(crate) inner: PhotonBeam,
}

impl PyPhotonBeam {
    fn label(&self) -> String {
        let b = &self.inner;
        let bw = if b.bandwidth_ev > 0.0 {
            format!(" ± {} eV", fmt_g(b.bandwidth_ev, 6))
        } else {
            String::new()
        };
        format!(
            "{} eV{bw} photons, {} cm⁻² s⁻¹",
            fmt_g(b.photon_energy_ev, 6),
            fmt_g(b.flux_cm2_s, 3)
        )
    }
}

#[pymethods]
impl PyPhotonBeam {
    #[new]
    #[pyo3(signature = (photon_energy_ev, flux_cm2_s, *, bandwidth_ev=0.0, multi_electron=None))]
    fn new(
        photon_energy_ev: &Bound<'_, PyAny>,
        flux_cm2_s: &Bound<'_, PyAny>,
        #[pyo3(from_py_with = super::convert::real::bandwidth_ev)] bandwidth_ev: f64,
        multi_electron: Option<&Bound<'_, PyAny>>,
    ) -> PyResult<Self> {
        let multi_electron = super::convert::flag_arg("multi_electron", multi_electron, true)?;
        Ok(PyPhotonBeam {
            inner: PhotonBeam::new(
                float_arg("photon_energy_ev", photon_energy_ev)?,
                float_arg("flux_cm2_s", flux_cm2_s)?,
                bandwidth_ev,
            )?
            .with_relaxation(Relaxation { multi_electron }),
        })
    }
    /// Whether the vacancies relax with shake-off and double Auger decay.
    #[getter]
    fn multi_electron(&self) -> bool {
        self.inner.relaxation.multi_electron
    }
    /// Photon energy (eV).
    #[getter]
    fn photon_energy_ev(&self) -> f64 {
        self.inner.photon_energy_ev
    }
    /// Photon flux (photons cm⁻² s⁻¹).
    #[getter]
    fn flux_cm2_s(&self) -> f64 {
        self.inner.flux_cm2_s
    }
    /// Gaussian bandwidth, FWHM (eV).
    #[getter]
    fn bandwidth_ev(&self) -> f64 {
        self.inner.bandwidth_ev
    }

    /// The element's jump-rate matrix ``rates[from, to]`` (s⁻¹) under this beam.
    ///
    /// Parameters
    /// ----------
    /// element : str or int
    ///     Symbol, name or Z.
    ///
    /// Returns
    /// -------
    /// ndarray, shape (Z+1, Z+1)
    ///     Rates of q → q+1+k from photoionization of each subshell followed by relaxation.
    fn rates<'py>(
        &self,
        py: Python<'py>,
        element: &Bound<'py, PyAny>,
    ) -> PyResult<Bound<'py, PyArray2<f64>>> {
        let el = element_arg(element)?;
        let net = guard(py, || photon_network(el, &self.inner, None))?;
        Ok(matrix_to_py(py, net.rate_matrix()))
    }

    /// Charge-state fractions over exposure time.
    ///
    /// Parameters
    /// ----------
    /// element : str or int
    ///     Symbol, name or Z.
    /// times_s : array_like
    ///     Output times (s), ascending, ≥ 0.
    /// initial_charge : int
    ///     Charge state of the atoms at t = 0 (0 = neutral).
    ///
    /// Returns
    /// -------
    /// Evolution
    ///     ``times_s``, ``charges``, ``fractions`` [T, Z+1], ``peak()``, ``plot()`` …
    #[pyo3(signature = (element, times_s, initial_charge=None))]
    fn evolve<'py>(
        &self,
        py: Python<'py>,
        element: &Bound<'py, PyAny>,
        times_s: &Bound<'py, PyAny>,
        initial_charge: Option<&Bound<'py, PyAny>>,
    ) -> PyResult<Bound<'py, PyAny>> {
        let el = element_arg(element)?;
        let times = times_arg(times_s)?;
        let q = match initial_charge {
            Some(q) => int_arg("initial_charge", q)?,
            None => 0,
        };
        el.check_charge(q, el.z())?;
        let out = guard(py, || self.inner.evolve(el, &times, q as u32))?;
        PyEvolution::result(py, el, times, out, self.label())
    }

    /// Long-time fractions of atoms that start neutral: where the photon ladder ends.
    ///
    /// Photons only raise the charge, so every atom ends in a charge state that no photon of
    /// this beam can ionize further; branching by relaxation spreads it over several.
    ///
    /// Parameters
    /// ----------
    /// element : str or int
    ///     Symbol, name or Z.
    ///
    /// Returns
    /// -------
    /// ndarray, shape (Z+1,)
    ///     Fraction of each charge state.
    fn steady_state<'py>(
        &self,
        py: Python<'py>,
        element: &Bound<'py, PyAny>,
    ) -> PyResult<Bound<'py, PyArray1<f64>>> {
        let el = element_arg(element)?;
        Ok(to_py(py, guard(py, || self.inner.steady_state(el))?))
    }

    /// The photon energy and exposure time that maximise one charge state (or a set).
    ///
    /// Parameters
    /// ----------
    /// element : str or int
    ///     Symbol, name or Z.
    /// charge : int or sequence of int
    ///     Target charge state(s), each listed once (a repeat is refused); with several, their
    ///     summed fraction is maximised.
    /// photon_energies_ev : array_like
    ///     Photon energies (eV) to try; flux and bandwidth held fixed.
    /// times_s : array_like
    ///     Exposure times (s), ascending.
    ///
    /// Returns
    /// -------
    /// PhotonEnergyScan
    ///     ``best_energy_ev``, ``best_time_s``, ``best_fraction`` and ``fraction[energy, time]``.
    fn best_energy<'py>(
        &self,
        py: Python<'py>,
        element: &Bound<'py, PyAny>,
        charge: &Bound<'py, PyAny>,
        photon_energies_ev: &Bound<'py, PyAny>,
        times_s: &Bound<'py, PyAny>,
    ) -> PyResult<Bound<'py, PyAny>> {
        let el = element_arg(element)?;
        let charges = charges_arg(el, &charge_list_arg(charge)?)?;
        let e = array1_arg("photon_energies_ev", photon_energies_ev)?;
        let t = times_arg(times_s)?;
        let source = crate::sources::Source::PhotonBeam(self.inner);
        let map = guard(py, || {
            source.energy_time_map(el, &charges, &e, &t, &mut |_, _| {})
        })?;
        PyEnergyScan::result(py, "PhotonEnergyScan", el, charges, map)
    }

    fn __repr__(&self) -> String {
        format!(
            "PhotonBeam(photon_energy_ev={}, flux_cm2_s={}, bandwidth_ev={})",
            fmt_g(self.inner.photon_energy_ev, 6),
            fmt_g(self.inner.flux_cm2_s, 6),
            fmt_g(self.inner.bandwidth_ev, 6)
        )
    }
}

/// (subshell labels, cross sections [energies, subshells] in cm²) of ion `charge`.
#[pyfunction]
fn _photoionization_subshells<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    charge: &Bound<'py, PyAny>,
    photon_energies_ev: &Bound<'py, PyAny>,
) -> PyResult<(Vec<String>, Bound<'py, PyArray2<f64>>)> {
    let el = element_arg(element)?;
    let charge = int_arg("charge", charge)?;
    let energies = array1_arg("photon_energies_ev", photon_energies_ev)?;
    let (labels, sigma) = guard(py, || {
        let ion = el.ion(charge)?;
        crate::error::require_all_positive("photon_energies_ev", &energies)?;
        let labels: Vec<String> = ion.subshells().iter().map(|s| s.subshell.label()).collect();
        let what = "the subshell photoionization cross sections";
        crate::limits::check_memory(
            what,
            crate::limits::bytes_for(&[energies.len(), labels.len()], 8),
        )?;
        let mut sigma = crate::limits::try_zeros(what, energies.len(), labels.len())?;
        for (i, &e) in energies.iter().enumerate() {
            if i % 4096 == 0 {
                crate::interrupt::check()?;
            }
            for (j, s) in subshell_cross_sections_cm2(&ion, e)?.iter().enumerate() {
                sigma[[i, j]] = s.cross_section_cm2;
            }
        }
        Ok((labels, sigma))
    })?;
    Ok((labels, matrix_to_py(py, sigma)))
}

/// Total photoionization cross section (cm²) of ion `charge` at each photon energy.
#[pyfunction]
fn _photoionization_total<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    charge: &Bound<'py, PyAny>,
    photon_energies_ev: &Bound<'py, PyAny>,
) -> PyResult<Bound<'py, PyArray1<f64>>> {
    let el = element_arg(element)?;
    let charge = int_arg("charge", charge)?;
    let energies = array1_arg("photon_energies_ev", photon_energies_ev)?;
    let sigma = guard(py, || {
        crate::processes::photoionization::photoionization_cross_sections_cm2(
            &el.ion(charge)?,
            &energies,
        )
    })?;
    Ok(super::to_py(py, sigma))
}

/// P(k), k = 0, 1, … extra electrons after a vacancy in `subshell` of ion `charge`.
#[pyfunction]
#[pyo3(signature = (element, charge, subshell, energy_ev=None, multi_electron=None))]
fn _vacancy_relaxation<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    charge: &Bound<'py, PyAny>,
    subshell: &str,
    energy_ev: Option<&Bound<'py, PyAny>>,
    multi_electron: Option<&Bound<'py, PyAny>>,
) -> PyResult<Bound<'py, PyArray1<f64>>> {
    let multi_electron = super::convert::flag_arg("multi_electron", multi_electron, true)?;
    let el = element_arg(element)?;
    let charge = int_arg("charge", charge)?;
    let s = Subshell::parse(subshell.trim())?;
    let energy_ev = match energy_ev {
        Some(e) if !e.is_none() => {
            let e = float_arg("energy_ev", e)?;
            crate::error::require_positive("energy_ev", e)?;
            e
        }
        _ => f64::INFINITY,
    };
    let p = guard(py, || {
        let ion = el.ion(charge)?;
        // The bound on extra electrons also checks that the subshell is occupied.
        max_extra_electrons(&ion, s)?;
        Ok(vacancy_relaxation_with(&ion, s, Relaxation { multi_electron }, energy_ev)?.to_vec())
    })?;
    Ok(to_py(py, p))
}

/// One way a photon makes a charge from the neutral atom: photoionization of ``subshell``
/// (binding energy ``binding_ev``) followed by relaxation, ending at that charge with
/// ``probability``.
#[pyclass(name = "ThresholdRoute", module = "chargecast", frozen)]
#[derive(Clone)]
pub(crate) struct PyThresholdRoute {
    inner: ThresholdRoute,
}

#[pymethods]
impl PyThresholdRoute {
    /// The subshell that loses the electron, e.g. ``"1s"``.
    #[getter]
    fn subshell(&self) -> String {
        self.inner.subshell.label()
    }
    /// Its binding energy in the neutral atom (eV).
    #[getter]
    fn binding_ev(&self) -> f64 {
        self.inner.binding_ev
    }
    /// Probability of ending at this charge once the subshell has lost an electron.
    #[getter]
    fn probability(&self) -> f64 {
        self.inner.probability
    }
    fn __repr__(&self) -> String {
        format!(
            "ThresholdRoute(subshell={:?}, binding_ev={}, probability={})",
            self.inner.subshell.label(),
            fmt_g(self.inner.binding_ev, 6),
            fmt_g(self.inner.probability, 3)
        )
    }
}

/// A charge state one photon can make from the neutral atom: ``charge``, ``threshold_ev``
/// (Σ IE below it), ``yield_per_photon`` and the ``routes`` that lead there.
#[pyclass(name = "ChargeThreshold", module = "chargecast", frozen)]
pub(crate) struct PyChargeThreshold {
    inner: ChargeThreshold,
}

fn routes(row: &ChargeThreshold) -> Vec<PyThresholdRoute> {
    row.routes
        .iter()
        .map(|r| PyThresholdRoute { inner: *r })
        .collect()
}

impl PyChargeThreshold {
    /// The Python row of one core threshold (also used by the scenario report).
    pub(crate) fn from_core(inner: ChargeThreshold) -> Self {
        PyChargeThreshold { inner }
    }
}

#[pymethods]
impl PyChargeThreshold {
    /// The charge state.
    #[getter]
    fn charge(&self) -> u32 {
        self.inner.charge
    }
    /// Σ of the ionization energies below this charge (eV).
    #[getter]
    fn threshold_ev(&self) -> f64 {
        self.inner.threshold_ev
    }
    /// Fraction of the absorbed photons that end at this charge.
    #[getter]
    fn yield_per_photon(&self) -> f64 {
        self.inner.yield_per_photon
    }
    /// Photoionization-plus-relaxation routes to this charge.
    #[getter]
    fn routes(&self) -> Vec<PyThresholdRoute> {
        routes(&self.inner)
    }
    fn __repr__(&self) -> String {
        format!(
            "ChargeThreshold(charge={}, threshold_ev={}, yield_per_photon={})",
            self.inner.charge,
            fmt_g(self.inner.threshold_ev, 6),
            fmt_g(self.inner.yield_per_photon, 3)
        )
    }
}

/// Charge states one photon can make from the neutral atom, and how.
///
/// Attributes
/// ----------
/// element : str
/// photon_energy_ev : float
/// charges : ndarray of int
///     Reachable charge states (Σ IE ≤ hν).
/// threshold_ev : ndarray
///     Σ of the ionization energies below each charge (eV).
/// yield_per_photon : ndarray
///     Fraction of the photons absorbed by the neutral atom that end at each charge
///     (photoionization of each subshell weighted by its cross section, then relaxation).
/// routes : list of list of ThresholdRoute
///     Per charge: every subshell whose photoionization followed by relaxation ends at that
///     charge (``subshell``, ``binding_ev``, ``probability`` of ending there once that
///     subshell has lost an electron). A charge without routes is open only to direct
///     multiple photoionization (shake-off), which the rate model leaves out.
/// rows : list of ChargeThreshold
///     The same, one object per charge.
#[pyclass(name = "PhotonThresholds", module = "chargecast", frozen, subclass)]
pub(crate) struct PyPhotonThresholds {
    element: &'static Element,
    photon_energy_ev: f64,
    rows: Vec<ChargeThreshold>,
}

#[pymethods]
impl PyPhotonThresholds {
    #[new]
    fn new() -> PyResult<Self> {
        super::results::staged("PhotonThresholds", "photon_thresholds()")
    }
    /// Element symbol.
    #[getter]
    fn element(&self) -> &str {
        self.element.symbol()
    }
    /// Photon energy (eV).
    #[getter]
    fn photon_energy_ev(&self) -> f64 {
        self.photon_energy_ev
    }
    /// Reachable charge states.
    #[getter]
    fn charges<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<i64>> {
        self.rows
            .iter()
            .map(|r| i64::from(r.charge))
            .collect::<Vec<_>>()
            .into_pyarray(py)
    }
    /// Σ IE below each charge (eV).
    #[getter]
    fn threshold_ev<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.rows.iter().map(|r| r.threshold_ev).collect())
    }
    /// Yield per absorbed photon of each charge.
    #[getter]
    fn yield_per_photon<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.rows.iter().map(|r| r.yield_per_photon).collect())
    }
    /// Routes to each charge.
    #[getter]
    fn routes(&self) -> Vec<Vec<PyThresholdRoute>> {
        self.rows.iter().map(routes).collect()
    }
    /// One object per reachable charge.
    #[getter]
    fn rows(&self) -> Vec<PyChargeThreshold> {
        self.rows
            .iter()
            .map(|r| PyChargeThreshold { inner: r.clone() })
            .collect()
    }
    /// Highest charge one photon can make (0 if the photon does not ionize).
    #[getter]
    fn max_charge(&self) -> u32 {
        self.rows.iter().map(|r| r.charge).max().unwrap_or(0)
    }
}

/// Charge states one photon can make from the neutral atom, and by which route.
///
/// A charge q is reachable when the sum of the first q ionization energies does not exceed
/// the photon energy (direct multiple photoionization is then energetically open). Inner
/// subshells bound by less than hν add routes: photoionization followed by relaxation.
/// For several elements at once see :func:`photon_selectivity`.
///
/// Parameters
/// ----------
/// element : str or int
///     Symbol, name or Z.
/// photon_energy_ev : float
///     Photon energy (eV), > 0.
///
/// Returns
/// -------
/// PhotonThresholds
///
/// Examples
/// --------
/// >>> import chargecast as cc
/// >>> th = cc.photon_thresholds("Ar", photon_energy_ev=3300.0)
/// >>> th.max_charge
/// 12
/// >>> th.charges[:3].tolist(), float(th.threshold_ev[0])
/// ([1, 2, 3], 15.7596...)
/// >>> [r.subshell for r in th.routes[3]]       # Ar4+: K holes, and L holes with shake-off
/// ['1s', '2s', '2p']
/// >>> round(float(th.yield_per_photon.sum()), 9)
/// 1.0
#[pyfunction]
#[pyo3(name = "photon_thresholds")]
fn photon_thresholds_py<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    photon_energy_ev: &Bound<'py, PyAny>,
) -> PyResult<Bound<'py, PyAny>> {
    let el = element_arg(element)?;
    let e = float_arg("photon_energy_ev", photon_energy_ev)?;
    let rows = guard(py, || photon_thresholds(el, e))?;
    let value = PyPhotonThresholds {
        element: el,
        photon_energy_ev: e,
        rows,
    };
    super::results::into_result(py, "PhotonThresholds", value)
}

/// Whether one photon ionizes one element: ``symbol``, ``first_ionization_ev``, ``ionizes``,
/// ``max_charge``, ``cross_section_cm2``.
#[pyclass(name = "ElementSelectivity", module = "chargecast", frozen)]
pub(crate) struct PyElementSelectivity {
    inner: Selectivity,
}

#[pymethods]
impl PyElementSelectivity {
    /// Element symbol.
    #[getter]
    fn symbol(&self) -> &str {
        &self.inner.symbol
    }
    /// First ionization energy (eV).
    #[getter]
    fn first_ionization_ev(&self) -> f64 {
        self.inner.first_ionization_ev
    }
    /// Whether the photon ionizes the neutral atom.
    #[getter]
    fn ionizes(&self) -> bool {
        self.inner.ionizes
    }
    /// Highest charge one photon can make.
    #[getter]
    fn max_charge(&self) -> u32 {
        self.inner.max_charge
    }
    /// Photoionization cross section of the neutral atom at hν (cm²).
    #[getter]
    fn cross_section_cm2(&self) -> f64 {
        self.inner.cross_section_cm2
    }
    fn __repr__(&self) -> String {
        format!(
            "ElementSelectivity({:?}, ionizes={}, max_charge={})",
            self.inner.symbol,
            if self.inner.ionizes { "True" } else { "False" },
            self.inner.max_charge
        )
    }
}

/// Which elements one photon energy ionizes (selectivity of a VUV source).
///
/// Attributes
/// ----------
/// photon_energy_ev : float
/// symbols : list of str
/// first_ionization_ev : ndarray
/// ionizes : ndarray of bool
/// max_charge : ndarray of int
///     Highest charge one photon can make.
/// cross_section_cm2 : ndarray
///     Photoionization cross section of the neutral atom at hν (cm²): Verner et al. (1996)
///     fits, or below 100 eV the Henke et al. (1993) totals where no fit exists.
/// ionized, not_ionized : list of str
///     Symbols of the elements the photon ionizes, and of those it leaves neutral.
/// rows : list of ElementSelectivity
///     One object per element.
#[pyclass(name = "PhotonSelectivity", module = "chargecast", frozen, subclass)]
pub(crate) struct PyPhotonSelectivity {
    photon_energy_ev: f64,
    rows: Vec<Selectivity>,
}

#[pymethods]
impl PyPhotonSelectivity {
    #[new]
    fn new() -> PyResult<Self> {
        super::results::staged("PhotonSelectivity", "photon_selectivity()")
    }
    /// Photon energy (eV).
    #[getter]
    fn photon_energy_ev(&self) -> f64 {
        self.photon_energy_ev
    }
    /// Element symbols, in the order given.
    #[getter]
    fn symbols(&self) -> Vec<String> {
        self.rows.iter().map(|r| r.symbol.clone()).collect()
    }
    /// First ionization energies (eV).
    #[getter]
    fn first_ionization_ev<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(
            py,
            self.rows.iter().map(|r| r.first_ionization_ev).collect(),
        )
    }
    /// Whether the photon ionizes each element.
    #[getter]
    fn ionizes<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<bool>> {
        self.rows
            .iter()
            .map(|r| r.ionizes)
            .collect::<Vec<_>>()
            .into_pyarray(py)
    }
    /// Highest charge one photon can make, per element.
    #[getter]
    fn max_charge<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<i64>> {
        self.rows
            .iter()
            .map(|r| i64::from(r.max_charge))
            .collect::<Vec<_>>()
            .into_pyarray(py)
    }
    /// Photoionization cross sections of the neutral atoms at hν (cm²).
    #[getter]
    fn cross_section_cm2<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.rows.iter().map(|r| r.cross_section_cm2).collect())
    }
    /// Symbols of the elements the photon ionizes.
    #[getter]
    fn ionized(&self) -> Vec<String> {
        self.rows
            .iter()
            .filter(|r| r.ionizes)
            .map(|r| r.symbol.clone())
            .collect()
    }
    /// Symbols of the elements the photon leaves neutral.
    #[getter]
    fn not_ionized(&self) -> Vec<String> {
        self.rows
            .iter()
            .filter(|r| !r.ionizes)
            .map(|r| r.symbol.clone())
            .collect()
    }
    /// One object per element.
    #[getter]
    fn rows(&self) -> Vec<PyElementSelectivity> {
        self.rows
            .iter()
            .map(|r| PyElementSelectivity { inner: r.clone() })
            .collect()
    }
}

/// For several elements, whether one photon of the given energy ionizes them.
///
/// Parameters
/// ----------
/// elements : sequence of str or int
///     Symbols, names or atomic numbers.
/// photon_energy_ev : float
///     Photon energy (eV), > 0.
///
/// Returns
/// -------
/// PhotonSelectivity
///
/// Examples
/// --------
/// >>> import chargecast as cc
/// >>> sel = cc.photon_selectivity(["Kr", "Ar", "N", "Xe"], photon_energy_ev=14.6)
/// >>> sel.ionized, sel.not_ionized
/// (['Kr', 'N', 'Xe'], ['Ar'])
#[pyfunction]
#[pyo3(name = "photon_selectivity")]
fn photon_selectivity_py<'py>(
    py: Python<'py>,
    elements: &Bound<'py, PyAny>,
    photon_energy_ev: &Bound<'py, PyAny>,
) -> PyResult<Bound<'py, PyAny>> {
    let els: Vec<&'static Element> = if elements.is_instance_of::<pyo3::types::PyString>()
        || elements.is_instance_of::<pyo3::types::PyInt>()
    {
        vec![element_arg(elements)?]
    } else {
        super::convert::iter_arg("elements", elements)?
            .map(|e| Ok(element_arg(&e?)?))
            .collect::<PyResult<_>>()?
    };
    let e = float_arg("photon_energy_ev", photon_energy_ev)?;
    let rows = guard(py, || photon_selectivity(&els, e))?;
    let value = PyPhotonSelectivity {
        photon_energy_ev: e,
        rows,
    };
    super::results::into_result(py, "PhotonSelectivity", value)
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<PyPhotonBeam>()?;
    m.add_class::<PyThresholdRoute>()?;
    m.add_class::<PyChargeThreshold>()?;
    m.add_class::<PyPhotonThresholds>()?;
    m.add_class::<PyElementSelectivity>()?;
    m.add_class::<PyPhotonSelectivity>()?;
    m.add_function(wrap_pyfunction!(_photoionization_subshells, m)?)?;
    m.add_function(wrap_pyfunction!(_photoionization_total, m)?)?;
    m.add_function(wrap_pyfunction!(_vacancy_relaxation, m)?)?;
    m.add_function(wrap_pyfunction!(photon_thresholds_py, m)?)?;
    m.add_function(wrap_pyfunction!(photon_selectivity_py, m)?)?;
    Ok(())
}

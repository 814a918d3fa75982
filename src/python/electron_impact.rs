//! Bindings of the single-collision electron-impact source: the source itself, the charge
//! yields of one collision and the appearance curves of an energy scan.

use numpy::{IntoPyArray, PyArray1, PyArray2};
use pyo3::prelude::*;

use super::convert::{array1_arg, float_arg, fmt_g, int_arg};
use super::{element_arg, guard, matrix_to_py, to_py};
use crate::atoms::Element;
use crate::error::Error;
use crate::processes::relaxation::Relaxation;
use crate::sources::electron_impact::{
    appearance_curves_with, ElectronImpactSource, ImpactCrossSections,
};

/// A single-collision electron-impact source (mass-spectrometer ion source).
///
/// Each neutral atom meets at most one electron. Charges form by Lotz ionization of each
/// subshell followed by relaxation of the hole (inner shells add charges, with shake-off and
/// double Auger decay), plus direct double and triple ionization (Shevelko & Tawara 1995
/// form, parameters from memory, ±30 % and ±50 %).
///
/// Parameters
/// ----------
/// energy_ev : float
///     Electron energy (eV), > 0.
/// energy_spread_ev : float, optional
///     Gaussian energy spread, full width at half maximum (eV), ≥ 0.
/// multi_electron : bool, optional
///     Include shake-off, double Auger decay and direct triple ionization (default True);
///     False gives the one-electron relaxation model and direct double ionization only.
///
/// Examples
/// --------
/// >>> import chargecast as cc
/// >>> src = cc.ElectronImpactSource(energy_ev=70.0, energy_spread_ev=0.5)
/// >>> y = src.charge_yields("Xe")
/// >>> y.charges.tolist()
/// [1, 2, 3]
/// >>> 0.05 < y.ratio(2) < 0.5
/// True
#[pyclass(name = "ElectronImpactSource", module = "chargecast", frozen)]
pub(crate) struct PyElectronImpactSource {
    inner: ElectronImpactSource,
}

#[pymethods]
impl PyElectronImpactSource {
    #[new]
    #[pyo3(signature = (energy_ev, *, energy_spread_ev=0.0, multi_electron=None))]
    fn new(
        energy_ev: &Bound<'_, PyAny>,
        #[pyo3(from_py_with = super::convert::real::energy_spread_ev)] energy_spread_ev: f64,
        multi_electron: Option<&Bound<'_, PyAny>>,
    ) -> PyResult<Self> {
        let multi_electron = super::convert::flag_arg("multi_electron", multi_electron, true)?;
        Ok(PyElectronImpactSource {
            inner: ElectronImpactSource::new(float_arg("energy_ev", energy_ev)?, energy_spread_ev)?
                .with_relaxation(Relaxation { multi_electron }),
        })
    }
    /// Whether shake-off, double Auger decay and direct triple ionization are included.
    #[getter]
    fn multi_electron(&self) -> bool {
        self.inner.relaxation.multi_electron
    }
    /// Electron energy (eV).
    #[getter]
    fn energy_ev(&self) -> f64 {
        self.inner.energy_ev
    }
    /// Gaussian energy spread, FWHM (eV).
    #[getter]
    fn energy_spread_ev(&self) -> f64 {
        self.inner.energy_spread_ev
    }

    /// Relative yields of 1+, 2+, 3+ … for one collision with the neutral atom.
    ///
    /// Parameters
    /// ----------
    /// element : str or int
    ///     Symbol, name or Z.
    ///
    /// Returns
    /// -------
    /// ChargeYields
    fn charge_yields<'py>(
        &self,
        py: Python<'py>,
        element: &Bound<'py, PyAny>,
    ) -> PyResult<Bound<'py, PyAny>> {
        let el = element_arg(element)?;
        let cs = guard(py, || self.inner.cross_sections(el))?;
        let value = PyChargeYields::new_from(el, self.inner, cs);
        super::results::into_result(py, "ChargeYields", value)
    }

    /// Parent and fragment ions of one collision with a molecule.
    ///
    /// The total ionization cross section is the additivity rule (sum of the atoms' Lotz
    /// cross sections above the molecule's ionization energy; 1.25–1.6 times the
    /// measured H2 and N2 totals at 100 eV); it is split by a fragmentation pattern: the bundled 70 eV one (NIST
    /// Chemistry WebBook EI spectra, from memory, 20–60 % per ion), or ``pattern``.
    ///
    /// Parameters
    /// ----------
    /// molecule : str
    ///     Chemical formula (case-sensitive: ``"CO"``, ``"CO2"``, ``"13CO"``).
    /// pattern : list of (str, int, float), optional
    ///     Your own pattern: (ion, charge, relative intensity) per ion, e.g.
    ///     ``[("CO2", 1, 100.0), ("CO", 1, 10.0)]``. Without one and without a bundled
    ///     pattern, every ionization gives the parent ion.
    ///
    /// Returns
    /// -------
    /// MoleculeYields
    ///
    /// Examples
    /// --------
    /// >>> import chargecast as cc
    /// >>> y = cc.ElectronImpactSource(energy_ev=70.0).molecule_yields("H2O")
    /// >>> y.ions[:2], round(float(y.shares[0]), 3)
    /// (['H2O', 'OH'], 0.806)
    #[pyo3(signature = (molecule, pattern=None))]
    fn molecule_yields(
        &self,
        py: Python<'_>,
        molecule: &Bound<'_, PyAny>,
        pattern: Option<&Bound<'_, PyAny>>,
    ) -> PyResult<super::molecules::PyMoleculeYields> {
        let text: String = molecule.extract().map_err(|_| {
            super::errors::argument_type_error(format!(
                "invalid molecule = {}: must be a formula string such as \"CO2\"",
                molecule
                    .repr()
                    .map_or_else(|_| "?".into(), |r| r.to_string())
            ))
        })?;
        let pattern: Option<Vec<(String, u32, f64)>> = pattern
            .map(|p| p.extract())
            .transpose()
            .map_err(|_| {
                super::errors::argument_type_error(
                    "invalid pattern: must be a list of (ion, charge, relative intensity) tuples such as [(\"CO2\", 1, 100.0)]".into(),
                )
            })?;
        let m = crate::atoms::Molecule::parse(&text)?;
        let source = self.inner;
        let inner = guard(py, || source.molecule_yields(&m, pattern.as_deref()))?;
        Ok(super::molecules::PyMoleculeYields {
            inner,
            energy_ev: source.energy_ev,
        })
    }

    /// Energy scan with this source's energy spread; see :func:`appearance_curves`.
    ///
    /// Parameters
    /// ----------
    /// element : str or int
    ///     Symbol, name or Z.
    /// energies_ev : array_like
    ///     Electron energies (eV), > 0.
    ///
    /// Returns
    /// -------
    /// AppearanceCurves
    fn appearance_curves<'py>(
        &self,
        py: Python<'py>,
        element: &Bound<'py, PyAny>,
        energies_ev: &Bound<'py, PyAny>,
    ) -> PyResult<Bound<'py, PyAny>> {
        curves(
            py,
            element,
            energies_ev,
            self.inner.energy_spread_ev,
            self.inner.relaxation,
        )
    }

    fn __repr__(&self) -> String {
        format!(
            "ElectronImpactSource(energy_ev={}, energy_spread_ev={})",
            fmt_g(self.inner.energy_ev, 6),
            fmt_g(self.inner.energy_spread_ev, 6)
        )
    }
}

/// Charge states one electron collision makes from the neutral atom.
///
/// Attributes
/// ----------
/// element : str
/// energy_ev, energy_spread_ev : float
/// charges : ndarray of int
///     1 … highest charge with a non-zero cross section.
/// cross_section_cm2 : ndarray
///     Partial cross section of each charge (cm²).
/// subshell_ionization_cm2 : ndarray
///     Part from single ionization of a subshell followed by relaxation (cm²).
/// direct_double_cm2 : ndarray
///     Part from direct double ionization (cm², charge 2 only).
/// yields : ndarray
///     Relative yields (sum 1; all 0 below the first ionization energy).
#[pyclass(name = "ChargeYields", module = "chargecast", frozen, subclass)]
pub(crate) struct PyChargeYields {
    element: &'static Element,
    source: ElectronImpactSource,
    cs: ImpactCrossSections,
    /// Highest charge shown: the last with a non-zero cross section (1 when none is).
    top: usize,
}

impl PyChargeYields {
    fn new_from(
        element: &'static Element,
        source: ElectronImpactSource,
        cs: ImpactCrossSections,
    ) -> Self {
        let total = cs.total_cm2();
        let top = (1..total.len())
            .rev()
            .find(|&q| total[q] > 0.0)
            .unwrap_or(1);
        PyChargeYields {
            element,
            source,
            cs,
            top,
        }
    }

    fn shown(&self, v: &[f64]) -> Vec<f64> {
        (1..=self.top)
            .map(|q| v.get(q).copied().unwrap_or(0.0))
            .collect()
    }

    fn total(&self) -> Vec<f64> {
        self.shown(&self.cs.total_cm2())
    }
}

#[pymethods]
impl PyChargeYields {
    #[new]
    fn new() -> PyResult<Self> {
        super::results::staged("ChargeYields", "ElectronImpactSource.charge_yields")
    }
    /// Element symbol.
    #[getter]
    fn element(&self) -> &str {
        self.element.symbol()
    }
    /// Electron energy (eV).
    #[getter]
    fn energy_ev(&self) -> f64 {
        self.source.energy_ev
    }
    /// Energy spread, FWHM (eV).
    #[getter]
    fn energy_spread_ev(&self) -> f64 {
        self.source.energy_spread_ev
    }
    /// Charges 1 … highest with a non-zero cross section.
    #[getter]
    fn charges<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<i64>> {
        (1..=self.top as i64).collect::<Vec<_>>().into_pyarray(py)
    }
    /// Partial cross section of each charge (cm²).
    #[getter]
    fn cross_section_cm2<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.total())
    }
    /// Part from single ionization of a subshell followed by relaxation (cm²).
    #[getter]
    fn subshell_ionization_cm2<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.shown(&self.cs.subshell_ionization_cm2))
    }
    /// Part from direct double ionization (cm²).
    #[getter]
    fn direct_double_cm2<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.shown(&self.cs.direct_double_cm2))
    }
    /// Part from direct triple ionization (cm²).
    #[getter]
    fn direct_triple_cm2<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.shown(&self.cs.direct_triple_cm2))
    }
    /// Relative yields (sum 1; all 0 below the first ionization energy).
    #[getter]
    fn yields<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        let total = self.total();
        let sum: f64 = total.iter().sum();
        to_py(
            py,
            total
                .iter()
                .map(|s| if sum > 0.0 { s / sum } else { 0.0 })
                .collect(),
        )
    }

    /// σ(charge)/σ(reference), e.g. ``ratio(2)`` = σ(2+)/σ(1+); nan when σ(reference) = 0.
    ///
    /// Parameters
    /// ----------
    /// charge, reference : int
    ///     Charge states, ≥ 1.
    ///
    /// Returns
    /// -------
    /// float
    #[pyo3(signature = (charge, reference=None))]
    fn ratio(
        &self,
        charge: &Bound<'_, PyAny>,
        reference: Option<&Bound<'_, PyAny>>,
    ) -> PyResult<f64> {
        let q = int_arg("charge", charge)?;
        let r = match reference {
            Some(r) => int_arg("reference", r)?,
            None => 1,
        };
        for (name, c) in [("charge", q), ("reference", r)] {
            if c < 1 {
                return Err(Error::invalid(name, c, "must be >= 1").into());
            }
        }
        let total = self.cs.total_cm2();
        let sigma = |c: i64| total.get(c as usize).copied().unwrap_or(0.0);
        let den = sigma(r);
        Ok(if den > 0.0 { sigma(q) / den } else { f64::NAN })
    }
}

/// Partial cross sections of each charge against electron energy (one collision).
///
/// Attributes
/// ----------
/// element : str
/// energies_ev : ndarray, shape (E,)
/// charges : ndarray of int
///     1 … highest charge seen anywhere in the scan.
/// cross_section_cm2 : ndarray, shape (E, len(charges))
/// energy_spread_ev : float
#[pyclass(name = "AppearanceCurves", module = "chargecast", frozen, subclass)]
pub(crate) struct PyAppearanceCurves {
    element: &'static Element,
    energies_ev: Vec<f64>,
    energy_spread_ev: f64,
    /// [energies, Z+1] (cm²).
    sigma: ndarray::Array2<f64>,
    top: usize,
}

#[pymethods]
impl PyAppearanceCurves {
    #[new]
    fn new() -> PyResult<Self> {
        super::results::staged("AppearanceCurves", "appearance_curves()")
    }
    /// Element symbol.
    #[getter]
    fn element(&self) -> &str {
        self.element.symbol()
    }
    /// Electron energies of the scan (eV).
    #[getter]
    fn energies_ev<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.energies_ev.clone())
    }
    /// Energy spread, FWHM (eV).
    #[getter]
    fn energy_spread_ev(&self) -> f64 {
        self.energy_spread_ev
    }
    /// Charges 1 … highest seen anywhere in the scan.
    #[getter]
    fn charges<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<i64>> {
        (1..=self.top as i64).collect::<Vec<_>>().into_pyarray(py)
    }
    /// Partial cross sections [energies, charges] (cm²).
    #[getter]
    fn cross_section_cm2<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray2<f64>> {
        let out = self.sigma.slice(ndarray::s![.., 1..=self.top]).to_owned();
        matrix_to_py(py, out)
    }

    /// Lowest scanned energy with a non-zero cross section for ``charge`` (nan if none).
    ///
    /// Parameters
    /// ----------
    /// charge : int
    ///     Charge state, ≥ 1.
    ///
    /// Returns
    /// -------
    /// float
    ///     Energy (eV).
    fn appearance_energy_ev(&self, charge: &Bound<'_, PyAny>) -> PyResult<f64> {
        let q = int_arg("charge", charge)?;
        if q < 1 || q as usize > self.top || q as usize >= self.sigma.ncols() {
            return Ok(f64::NAN);
        }
        Ok(self
            .sigma
            .column(q as usize)
            .iter()
            .zip(&self.energies_ev)
            .find(|(s, _)| **s > 0.0)
            .map(|(_, e)| *e)
            .unwrap_or(f64::NAN))
    }
}

fn curves<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    energies_ev: &Bound<'py, PyAny>,
    energy_spread_ev: f64,
    relaxation: Relaxation,
) -> PyResult<Bound<'py, PyAny>> {
    let el = element_arg(element)?;
    let ndim: usize = py
        .import("numpy")?
        .call_method1("ndim", (energies_ev,))?
        .extract()?;
    if ndim > 1 {
        return Err(Error::invalid(
            "energies_ev",
            format!("{ndim} dimensions"),
            "must be one-dimensional",
        )
        .into());
    }
    let e = array1_arg("energies_ev", energies_ev)?;
    let sigma = guard(py, || {
        appearance_curves_with(el, &e, energy_spread_ev, relaxation)
    })?;
    curves_result(py, el, e, energy_spread_ev, sigma)
}

/// Appearance curves `sigma` [energies, Z+1] (cm²) as the Python result object.
pub(crate) fn curves_result<'py>(
    py: Python<'py>,
    element: &'static Element,
    energies_ev: Vec<f64>,
    energy_spread_ev: f64,
    sigma: ndarray::Array2<f64>,
) -> PyResult<Bound<'py, PyAny>> {
    let n = sigma.ncols();
    let top = (1..n)
        .rev()
        .find(|&q| sigma.column(q).iter().any(|s| *s > 0.0))
        .unwrap_or(1);
    let value = PyAppearanceCurves {
        element,
        energies_ev,
        energy_spread_ev,
        sigma,
        top,
    };
    super::results::into_result(py, "AppearanceCurves", value)
}

/// Energy scan of a single-collision electron source: partial cross section per charge.
///
/// Parameters
/// ----------
/// element : str or int
///     Symbol, name or Z.
/// energies_ev : array_like
///     Electron energies (eV), > 0.
/// energy_spread_ev : float, optional
///     Gaussian energy spread of the electrons, full width at half maximum (eV), ≥ 0.
/// multi_electron : bool, optional
///     Include shake-off, double Auger decay and direct triple ionization (default True).
///
/// Returns
/// -------
/// AppearanceCurves
///
/// Examples
/// --------
/// >>> import numpy as np
/// >>> import chargecast as cc
/// >>> curves = cc.appearance_curves("Kr", np.linspace(10.0, 200.0, 96))
/// >>> curves.appearance_energy_ev(1), curves.appearance_energy_ev(2)
/// (14.0, 40.0)
#[pyfunction]
#[pyo3(name = "appearance_curves", signature = (element, energies_ev, energy_spread_ev=0.0, *, multi_electron=None))]
fn appearance_curves_py<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    energies_ev: &Bound<'py, PyAny>,
    #[pyo3(from_py_with = super::convert::real::energy_spread_ev)] energy_spread_ev: f64,
    multi_electron: Option<&Bound<'py, PyAny>>,
) -> PyResult<Bound<'py, PyAny>> {
    let multi_electron = super::convert::flag_arg("multi_electron", multi_electron, true)?;
    curves(
        py,
        element,
        energies_ev,
        energy_spread_ev,
        Relaxation { multi_electron },
    )
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<PyElectronImpactSource>()?;
    m.add_class::<PyChargeYields>()?;
    m.add_class::<PyAppearanceCurves>()?;
    m.add_function(wrap_pyfunction!(appearance_curves_py, m)?)?;
    Ok(())
}

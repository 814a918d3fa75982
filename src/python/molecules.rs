//! Bindings of molecules: `molecule("CO2")` with its masses, isotopologue pattern, ionization
//! energies and bundled fragmentation pattern; the molecular yields of the single-collision
//! electron-impact source.

use std::collections::BTreeMap;

use numpy::{IntoPyArray, PyArray1};
use pyo3::prelude::*;
use pyo3::types::{PyDict, PyString};

use super::convert::int_arg;
use super::{guard, to_py};
use crate::atoms::Molecule;
use crate::sources::electron_impact::MoleculeYields;

/// A molecule from its chemical formula.
///
/// Formulas are case-sensitive, as chemists write them: ``"CO"`` is carbon monoxide,
/// ``"Co"`` cobalt. Isotopologues: ``"13CO"``, ``"(15N)2"``, ``"D2O"``, ``"HD"``.
///
/// Parameters
/// ----------
/// formula : str
///     Chemical formula of two or more atoms.
///
/// Returns
/// -------
/// Molecule
///
/// Examples
/// --------
/// >>> import chargecast as cc
/// >>> co2 = cc.molecule("CO2")
/// >>> co2.name, co2.electrons
/// ('carbon dioxide', 22)
/// >>> round(co2.monoisotopic_mass_u, 6)
/// 43.989829
#[pyfunction]
fn molecule(formula: &Bound<'_, PyAny>) -> PyResult<PyMolecule> {
    if !formula.is_instance_of::<PyString>() {
        return Err(super::errors::argument_type_error(format!(
            "invalid formula = {}: must be a string such as \"CO2\"",
            formula
                .repr()
                .map_or_else(|_| "?".into(), |r| r.to_string())
        )));
    }
    let text: String = formula.extract()?;
    Ok(PyMolecule {
        inner: Molecule::parse(&text)?,
    })
}

/// A molecule: composition, masses (u), isotopologue pattern and, for the bundled gases,
/// name, ionization energies (eV) with their sources and the 70 eV fragmentation pattern.
/// Made by :func:`molecule`.
///
/// Examples
/// --------
/// >>> import chargecast as cc
/// >>> h2o = cc.molecule("H2O")
/// >>> float(h2o.ionization_energies_ev[0]), h2o.composition
/// (12.621, [('H', 2), ('O', 1)])
/// >>> iso = h2o.isotopologues()
/// >>> iso["label"][0], round(float(iso["abundance"][0]), 4)
/// ('(1H)2(16O)', 0.9973)
/// >>> round(h2o.ion_mass_u(1), 6)  # 1H2 16O+: atomic masses − mₑ
/// 18.010016
#[pyclass(name = "Molecule", module = "chargecast", frozen)]
pub(crate) struct PyMolecule {
    inner: Molecule,
}

#[pymethods]
impl PyMolecule {
    /// The formula as the parser writes it back ("H2O", "(13C)O").
    #[getter]
    fn formula(&self) -> String {
        self.inner.label()
    }
    /// Name of a bundled molecule ("water"), else None.
    #[getter]
    fn name(&self) -> Option<&'static str> {
        self.inner.name()
    }
    /// Electrons of the neutral molecule (the highest charge).
    #[getter]
    fn electrons(&self) -> u32 {
        self.inner.electrons()
    }
    /// Atoms per element symbol.
    #[getter]
    fn composition(&self) -> Vec<(String, u32)> {
        self.inner
            .formula()
            .composition()
            .into_iter()
            .map(|(z, n)| {
                let symbol = crate::atoms::element_by_z(z as i64).map_or("?", |e| e.symbol());
                (symbol.to_string(), n)
            })
            .collect()
    }
    /// Mean mass over the isotopologue pattern (u).
    #[getter]
    fn mass_u(&self) -> PyResult<f64> {
        Ok(self.inner.mass_u()?)
    }
    /// Mass with every atom at its most abundant isotope (or the one written) (u).
    #[getter]
    fn monoisotopic_mass_u(&self) -> PyResult<f64> {
        Ok(self.inner.monoisotopic_mass_u()?)
    }
    /// First (and where known second) ionization energy (eV); empty when not bundled.
    #[getter]
    fn ionization_energies_ev<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.inner.ionization_energies_ev().to_vec())
    }
    /// Uncertainty of each ionization energy (eV).
    #[getter]
    fn ionization_uncertainties_ev<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.inner.ionization_uncertainties_ev().to_vec())
    }
    /// Where each ionization energy comes from.
    #[getter]
    fn ionization_energy_sources(&self) -> Vec<String> {
        self.inner.ionization_energy_sources().to_vec()
    }
    /// The bundled 70 eV fragmentation pattern: (ion, charge, relative intensity with base
    /// peak 100, relative uncertainty, source) per ion; empty when none is bundled.
    #[getter]
    fn pattern(&self) -> Vec<(String, u32, f64, f64, String)> {
        self.inner
            .pattern()
            .unwrap_or(&[])
            .iter()
            .map(|e| {
                (
                    e.ion.clone(),
                    e.charge,
                    e.relative_intensity,
                    e.relative_uncertainty,
                    e.source.clone(),
                )
            })
            .collect()
    }

    /// Isotopologues, most abundant first.
    ///
    /// Returns
    /// -------
    /// dict
    ///     ``label`` (list of str, e.g. ``"(12C)(16O)2"``), ``mass_number`` (ndarray of int),
    ///     ``mass_u`` (ndarray, neutral masses in u) and ``abundance`` (ndarray, shares of
    ///     the natural pattern: the multinomial over the isotopes' abundances).
    fn isotopologues<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyDict>> {
        let pattern = guard(py, || self.inner.isotopologues())?;
        let d = PyDict::new(py);
        d.set_item(
            "label",
            pattern.iter().map(|i| i.label()).collect::<Vec<_>>(),
        )?;
        d.set_item(
            "mass_number",
            pattern
                .iter()
                .map(|i| i64::from(i.mass_number()))
                .collect::<Vec<_>>()
                .into_pyarray(py),
        )?;
        d.set_item(
            "mass_u",
            to_py(py, pattern.iter().map(|i| i.mass_u).collect()),
        )?;
        d.set_item(
            "abundance",
            to_py(py, pattern.iter().map(|i| i.abundance).collect()),
        )?;
        Ok(d)
    }

    /// Mass of an isotopologue's ion (u): neutral mass − q·mₑ.
    ///
    /// Parameters
    /// ----------
    /// charge : int
    ///     1 … electrons.
    /// isotopologue : int, optional
    ///     Index into :meth:`isotopologues` (default None: 0, the most abundant).
    ///
    /// Returns
    /// -------
    /// float
    #[pyo3(signature = (charge, isotopologue=None))]
    fn ion_mass_u(
        &self,
        charge: &Bound<'_, PyAny>,
        isotopologue: Option<&Bound<'_, PyAny>>,
    ) -> PyResult<f64> {
        let q = int_arg("charge", charge)?;
        let i = isotopologue
            .map(|v| int_arg("isotopologue", v))
            .transpose()?
            .unwrap_or(0);
        let pattern = self.inner.isotopologues()?;
        let iso = usize::try_from(i)
            .ok()
            .and_then(|i| pattern.get(i))
            .ok_or_else(|| {
                crate::error::Error::invalid(
                    "isotopologue",
                    i,
                    &format!("an index 0..{} into isotopologues()", pattern.len()),
                )
            })?;
        let line = crate::spectrum::Line::molecular(iso, q, 1.0, false)?;
        Ok(line.mass_u)
    }

    fn __repr__(&self) -> String {
        match self.inner.name() {
            Some(n) => format!("Molecule({:?}, {n})", self.inner.label()),
            None => format!("Molecule({:?})", self.inner.label()),
        }
    }
}

/// Parent and fragment ions of one electron collision with a molecule. Made by
/// ``ElectronImpactSource.molecule_yields``.
///
/// Examples
/// --------
/// >>> import chargecast as cc
/// >>> y = cc.ElectronImpactSource(energy_ev=70.0).molecule_yields("CO")
/// >>> y.ions, y.charges.tolist()
/// (['CO', 'C', 'O'], [1, 1, 1])
/// >>> sorted(y.species())
/// ['C', 'CO', 'O']
/// >>> lines = cc.aq_lines(y.species(), residual_gas={})  # the m/z spectrum of these ions
#[pyclass(name = "MoleculeYields", module = "chargecast", frozen)]
pub(crate) struct PyMoleculeYields {
    pub(crate) inner: MoleculeYields,
    pub(crate) energy_ev: f64,
}

#[pymethods]
impl PyMoleculeYields {
    /// The molecule's formula.
    #[getter]
    fn molecule(&self) -> String {
        self.inner.molecule.clone()
    }
    /// Electron energy (eV).
    #[getter]
    fn energy_ev(&self) -> f64 {
        self.energy_ev
    }
    /// Total counting ionization cross section (cm²), additivity rule.
    #[getter]
    fn total_cross_section_cm2(&self) -> f64 {
        self.inner.total_cm2
    }
    /// Species string of each ion ("CO2", "CO", "O").
    #[getter]
    fn ions(&self) -> Vec<String> {
        self.inner.fragments.iter().map(|f| f.ion.clone()).collect()
    }
    /// Charge of each ion.
    #[getter]
    fn charges<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<i64>> {
        self.inner
            .fragments
            .iter()
            .map(|f| i64::from(f.charge))
            .collect::<Vec<_>>()
            .into_pyarray(py)
    }
    /// Partial cross section of each ion (cm²).
    #[getter]
    fn cross_section_cm2<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(
            py,
            self.inner
                .fragments
                .iter()
                .map(|f| f.cross_section_cm2)
                .collect(),
        )
    }
    /// Share of each ion among all ions made (sum 1; all 0 below threshold).
    #[getter]
    fn shares<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.inner.fragments.iter().map(|f| f.share).collect())
    }
    /// Relative uncertainty of each pattern entry (NaN for a user pattern).
    #[getter]
    fn relative_uncertainty<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(
            py,
            self.inner
                .fragments
                .iter()
                .map(|f| f.relative_uncertainty)
                .collect(),
        )
    }
    /// Where the pattern comes from.
    #[getter]
    fn pattern_source(&self) -> String {
        self.inner.pattern_source.clone()
    }

    /// The ions as a species mapping for :func:`aq_lines`: ``{ion: {charge: share}}``.
    ///
    /// Returns
    /// -------
    /// dict
    fn species(&self) -> BTreeMap<String, BTreeMap<u32, f64>> {
        let mut out: BTreeMap<String, BTreeMap<u32, f64>> = BTreeMap::new();
        for f in &self.inner.fragments {
            *out.entry(f.ion.clone())
                .or_default()
                .entry(f.charge)
                .or_insert(0.0) += f.share;
        }
        out
    }

    fn __repr__(&self) -> String {
        let parts: Vec<String> = self
            .inner
            .fragments
            .iter()
            .map(|f| format!("{}{}+ {:.3}", f.ion, f.charge, f.share))
            .collect();
        format!(
            "MoleculeYields({} at {} eV: {})",
            self.inner.molecule,
            self.energy_ev,
            parts.join(", ")
        )
    }
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(molecule, m)?)?;
    m.add_class::<PyMolecule>()?;
    m.add_class::<PyMoleculeYields>()?;
    Ok(())
}

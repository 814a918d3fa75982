//! Bindings of the photon-beam and single-collision sources, photoionization cross sections
//! and vacancy relaxation. The Python classes in `chargecast.photon` wrap these functions.

use numpy::{PyArray1, PyArray2, PyReadonlyArray1};
use pyo3::prelude::*;
use pyo3::types::PyDict;

use super::convert::{charges_arg, energy_map_to_py};
use super::{element_arg, guard, matrix_to_py, to_py, vec_arg};
use crate::atoms::{Element, Subshell};
use crate::error::Result;
use crate::processes::photoionization::subshell_cross_sections_cm2;
use crate::processes::relaxation::{max_extra_electrons, vacancy_relaxation};
use crate::sources::electron_impact::{appearance_curves, ElectronImpactSource};
use crate::sources::photon_beam::{photon_selectivity, photon_thresholds, PhotonBeam};

/// (subshell labels, binding energies (eV), model names per energy and subshell,
/// cross sections [energies, subshells] in cm²) of ion `charge`.
#[pyfunction]
#[allow(clippy::type_complexity)]
fn _photoionization_subshells<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    charge: i64,
    photon_energy_ev: PyReadonlyArray1<'py, f64>,
) -> PyResult<(
    Vec<String>,
    Vec<f64>,
    Vec<Vec<&'static str>>,
    Bound<'py, PyArray2<f64>>,
)> {
    let el = element_arg(element)?;
    let energies = vec_arg(&photon_energy_ev);
    let (labels, bindings, models, sigma) = guard(py, || {
        let ion = el.ion(charge)?;
        crate::error::require_all_positive("photon_energy_ev", &energies)?;
        let labels: Vec<String> = ion.subshells().iter().map(|s| s.subshell.label()).collect();
        let bindings: Vec<f64> = ion.subshells().iter().map(|s| s.binding_ev).collect();
        let mut sigma = ndarray::Array2::zeros((energies.len(), labels.len()));
        let mut models = Vec::with_capacity(energies.len());
        for (i, &e) in energies.iter().enumerate() {
            let row = subshell_cross_sections_cm2(&ion, e)?;
            models.push(row.iter().map(|s| s.model.label()).collect());
            for (j, s) in row.iter().enumerate() {
                sigma[[i, j]] = s.cross_section_cm2;
            }
        }
        Ok((labels, bindings, models, sigma))
    })?;
    Ok((labels, bindings, models, matrix_to_py(py, sigma)))
}

fn subshell_arg(label: &str) -> Result<Subshell> {
    Subshell::parse(label.trim())
}

/// P(k), k = 0, 1, … extra electrons after a vacancy in `subshell` of ion `charge`.
#[pyfunction]
fn _vacancy_relaxation<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    charge: i64,
    subshell: &str,
) -> PyResult<(Bound<'py, PyArray1<f64>>, u32)> {
    let el = element_arg(element)?;
    let s = subshell_arg(subshell)?;
    let (p, bound) = guard(py, || {
        let ion = el.ion(charge)?;
        Ok((
            vacancy_relaxation(&ion, s)?.to_vec(),
            max_extra_electrons(&ion, s)?,
        ))
    })?;
    Ok((to_py(py, p), bound))
}

/// [(charge, threshold_ev, yield_per_photon, [(subshell, binding_ev, probability)])].
#[pyfunction]
#[allow(clippy::type_complexity)]
fn _photon_thresholds(
    py: Python<'_>,
    element: &Bound<'_, PyAny>,
    photon_energy_ev: f64,
) -> PyResult<Vec<(u32, f64, f64, Vec<(String, f64, f64)>)>> {
    let el = element_arg(element)?;
    let rows = guard(py, || photon_thresholds(el, photon_energy_ev))?;
    Ok(rows
        .into_iter()
        .map(|r| {
            let routes = r
                .routes
                .iter()
                .map(|t| (t.subshell.label(), t.binding_ev, t.probability))
                .collect();
            (r.charge, r.threshold_ev, r.yield_per_photon, routes)
        })
        .collect())
}

/// [(symbol, first_ionization_ev, ionizes, max_charge, cross_section_cm2)].
#[pyfunction]
#[allow(clippy::type_complexity)]
fn _photon_selectivity(
    py: Python<'_>,
    elements: Vec<Bound<'_, PyAny>>,
    photon_energy_ev: f64,
) -> PyResult<Vec<(String, f64, bool, u32, f64)>> {
    let els: Vec<&'static Element> = elements.iter().map(element_arg).collect::<Result<_>>()?;
    let rows = guard(py, || photon_selectivity(&els, photon_energy_ev))?;
    Ok(rows
        .into_iter()
        .map(|r| {
            (
                r.symbol,
                r.first_ionization_ev,
                r.ionizes,
                r.max_charge,
                r.cross_section_cm2,
            )
        })
        .collect())
}

/// Validate a photon beam; raises InvalidParameterError.
#[pyfunction]
fn _photon_beam_check(photon_energy_ev: f64, flux_cm2_s: f64, bandwidth_ev: f64) -> PyResult<()> {
    PhotonBeam::new(photon_energy_ev, flux_cm2_s, bandwidth_ev)?;
    Ok(())
}

/// Jump-rate matrix rates[from, to] (s⁻¹) under a photon beam.
#[pyfunction]
fn _photon_rates<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    photon_energy_ev: f64,
    flux_cm2_s: f64,
    bandwidth_ev: f64,
) -> PyResult<Bound<'py, PyArray2<f64>>> {
    let el = element_arg(element)?;
    let beam = PhotonBeam::new(photon_energy_ev, flux_cm2_s, bandwidth_ev)?;
    Ok(matrix_to_py(py, guard(py, || beam.rate_matrix_per_s(el))?))
}

/// Fractions [times, Z+1] under a photon beam, atoms starting as `initial_charge`.
#[pyfunction]
#[allow(clippy::too_many_arguments)]
fn _photon_evolve<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    photon_energy_ev: f64,
    flux_cm2_s: f64,
    bandwidth_ev: f64,
    times_s: PyReadonlyArray1<'py, f64>,
    initial_charge: i64,
) -> PyResult<Bound<'py, PyArray2<f64>>> {
    let el = element_arg(element)?;
    let beam = PhotonBeam::new(photon_energy_ev, flux_cm2_s, bandwidth_ev)?;
    el.check_charge(initial_charge, el.z())?;
    let times = vec_arg(&times_s);
    Ok(matrix_to_py(
        py,
        guard(py, || beam.evolve(el, &times, initial_charge as u32))?,
    ))
}

/// Long-time fractions (Z+1) of atoms that start neutral.
#[pyfunction]
fn _photon_steady_state<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    photon_energy_ev: f64,
    flux_cm2_s: f64,
    bandwidth_ev: f64,
) -> PyResult<Bound<'py, PyArray1<f64>>> {
    let el = element_arg(element)?;
    let beam = PhotonBeam::new(photon_energy_ev, flux_cm2_s, bandwidth_ev)?;
    Ok(to_py(py, guard(py, || beam.steady_state(el))?))
}

/// Target fraction over a photon-energy × time grid: dict with fraction, best_*.
#[pyfunction]
#[allow(clippy::too_many_arguments)]
fn _photon_energy_time_map<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    charges: Vec<i64>,
    flux_cm2_s: f64,
    bandwidth_ev: f64,
    photon_energies_ev: PyReadonlyArray1<'py, f64>,
    times_s: PyReadonlyArray1<'py, f64>,
) -> PyResult<Bound<'py, PyDict>> {
    let el = element_arg(element)?;
    let (e, t) = (vec_arg(&photon_energies_ev), vec_arg(&times_s));
    // The photon energy is replaced point by point; the first one validates flux and bandwidth.
    let beam = PhotonBeam::new(e.first().copied().unwrap_or(1.0), flux_cm2_s, bandwidth_ev)?;
    let charges = charges_arg(el, &charges)?;
    let map = guard(py, || beam.energy_time_map(el, &charges, &e, &t))?;
    energy_map_to_py(py, map)
}

/// Validate a single-collision source; raises InvalidParameterError.
#[pyfunction]
fn _impact_source_check(energy_ev: f64, energy_spread_ev: f64) -> PyResult<()> {
    ElectronImpactSource::new(energy_ev, energy_spread_ev)?;
    Ok(())
}

/// (subshell-ionization route, direct double ionization) partial cross sections (cm²) per
/// final charge 0…Z for one collision with the neutral atom.
#[pyfunction]
#[allow(clippy::type_complexity)]
fn _impact_cross_sections<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    energy_ev: f64,
    energy_spread_ev: f64,
) -> PyResult<(Bound<'py, PyArray1<f64>>, Bound<'py, PyArray1<f64>>)> {
    let el = element_arg(element)?;
    let source = ElectronImpactSource::new(energy_ev, energy_spread_ev)?;
    let cs = guard(py, || source.cross_sections(el))?;
    Ok((
        to_py(py, cs.subshell_ionization_cm2),
        to_py(py, cs.direct_double_cm2),
    ))
}

/// Partial cross sections [energies, Z+1] (cm²) of one collision with the neutral atom.
#[pyfunction]
fn _appearance_curves<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    energies_ev: PyReadonlyArray1<'py, f64>,
    energy_spread_ev: f64,
) -> PyResult<Bound<'py, PyArray2<f64>>> {
    let el = element_arg(element)?;
    let e = vec_arg(&energies_ev);
    Ok(matrix_to_py(
        py,
        guard(py, || appearance_curves(el, &e, energy_spread_ev))?,
    ))
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(_photoionization_subshells, m)?)?;
    m.add_function(wrap_pyfunction!(_vacancy_relaxation, m)?)?;
    m.add_function(wrap_pyfunction!(_photon_thresholds, m)?)?;
    m.add_function(wrap_pyfunction!(_photon_selectivity, m)?)?;
    m.add_function(wrap_pyfunction!(_photon_beam_check, m)?)?;
    m.add_function(wrap_pyfunction!(_photon_rates, m)?)?;
    m.add_function(wrap_pyfunction!(_photon_evolve, m)?)?;
    m.add_function(wrap_pyfunction!(_photon_steady_state, m)?)?;
    m.add_function(wrap_pyfunction!(_photon_energy_time_map, m)?)?;
    m.add_function(wrap_pyfunction!(_impact_source_check, m)?)?;
    m.add_function(wrap_pyfunction!(_impact_cross_sections, m)?)?;
    m.add_function(wrap_pyfunction!(_appearance_curves, m)?)?;
    Ok(())
}

//! Bindings of the dynamic-model part of a plan report (`Report.dynamics`): rows at the
//! extraction time, and the run behind them (a `DynamicRun`, for its histories).

use std::collections::BTreeMap;

use pyo3::prelude::*;

use crate::plan::DynamicReport;

/// One charge state of the target species at the extraction time (dynamic model).
#[pyclass(name = "DynamicChargeRow", module = "chargecast", frozen, get_all)]
#[derive(Clone)]
pub(crate) struct PyDynamicChargeRow {
    charge: u32,
    ions: f64,
    temperature_ev: f64,
    overlap: f64,
    escape_per_s: f64,
}

/// One species in the trap at the extraction time (dynamic model).
#[pyclass(name = "DynamicSpeciesRow", module = "chargecast", frozen, get_all)]
#[derive(Clone)]
pub(crate) struct PyDynamicSpeciesRow {
    label: String,
    fed_only: bool,
    ions: f64,
    mean_charge: f64,
    mean_temperature_ev: f64,
    escape_per_s: f64,
}

/// What the ion-dynamics model adds to a plan report.
#[pyclass(name = "DynamicReport", module = "chargecast", frozen)]
pub(crate) struct PyDynamicReport {
    inner: DynamicReport,
}

impl PyDynamicReport {
    pub(crate) fn new(inner: DynamicReport) -> Self {
        PyDynamicReport { inner }
    }
}

#[pymethods]
impl PyDynamicReport {
    #[getter]
    fn axial_barrier_v(&self) -> f64 {
        self.inner.axial_barrier_v
    }
    #[getter]
    fn drift_tube_radius_m(&self) -> f64 {
        self.inner.drift_tube_radius_m
    }
    /// Fed gases: partial pressure (Pa) by formula.
    #[getter]
    fn gas_feed_pa(&self) -> BTreeMap<String, f64> {
        self.inner.gas_feed_pa.iter().cloned().collect()
    }
    /// The dynamic processes that were on.
    #[getter]
    fn processes(&self) -> Vec<&'static str> {
        self.inner.processes.clone()
    }
    /// Atoms of all scenario species injected into the beam at t = 0.
    #[getter]
    fn injected_atoms(&self) -> f64 {
        self.inner.injected_atoms
    }
    /// Label of the species that carries the target ("Ar", "129Xe").
    #[getter]
    fn target_species(&self) -> &str {
        &self.inner.target_species
    }
    #[getter]
    fn extraction_time_s(&self) -> f64 {
        self.inner.extraction_s
    }
    /// The target charge and its neighbours at the extraction time.
    #[getter]
    fn target_rows(&self) -> Vec<PyDynamicChargeRow> {
        self.inner
            .target_rows
            .iter()
            .map(|r| PyDynamicChargeRow {
                charge: r.charge,
                ions: r.ions,
                temperature_ev: r.temperature_ev,
                overlap: r.overlap,
                escape_per_s: r.escape_per_s,
            })
            .collect()
    }
    /// Every species in the trap (fed gases included) at the extraction time.
    #[getter]
    fn species_rows(&self) -> Vec<PyDynamicSpeciesRow> {
        self.inner
            .species_rows
            .iter()
            .map(|r| PyDynamicSpeciesRow {
                label: r.label.clone(),
                fed_only: r.fed_only,
                ions: r.ions,
                mean_charge: r.mean_charge,
                mean_temperature_ev: r.mean_temperature_ev,
                escape_per_s: r.escape_per_s,
            })
            .collect()
    }
    /// Trapped positive charge over the electrons' charge at the extraction time.
    #[getter]
    fn compensation(&self) -> f64 {
        self.inner.compensation
    }
    /// Radial well depth (V) at the extraction time.
    #[getter]
    fn well_depth_v(&self) -> f64 {
        self.inner.well_depth_v
    }
    /// Largest relative miss of the particle account over the run.
    #[getter]
    fn particle_balance(&self) -> f64 {
        self.inner.run.bookkeeping.particle_balance
    }
    /// Largest relative miss of the energy account over the run.
    #[getter]
    fn energy_balance(&self) -> f64 {
        self.inner.run.bookkeeping.energy_balance
    }
    /// Particles injected at t = 0, ions fed, particles escaped and trapped at the last time.
    #[getter]
    fn particles(&self) -> BTreeMap<&'static str, f64> {
        let b = &self.inner.run.bookkeeping;
        let last = |a: &ndarray::Array1<f64>| a.iter().next_back().copied().unwrap_or(0.0);
        BTreeMap::from([
            ("injected", b.initial_particles),
            ("fed", last(&b.fed)),
            ("escaped", last(&b.escaped)),
            ("trapped", last(&b.trapped)),
        ])
    }
    /// Thermal energy (eV) brought in, carried out and held at the last time.
    #[getter]
    fn energy_ev(&self) -> BTreeMap<&'static str, f64> {
        let b = &self.inner.run.bookkeeping;
        let last = |a: &ndarray::Array1<f64>| a.iter().next_back().copied().unwrap_or(0.0);
        BTreeMap::from([
            ("in", last(&b.energy_in_ev)),
            ("out", last(&b.energy_out_ev)),
            ("thermal", last(&b.thermal_energy_ev)),
        ])
    }
    /// The whole run behind the report (a ``DynamicRun``: histories of N, kT, escape and
    /// overlap for every species, compensation and well depth over time).
    #[getter]
    fn run<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyAny>> {
        super::trap_dynamics::PyDynamicRun::result(py, self.inner.run.clone())
    }
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<PyDynamicReport>()?;
    m.add_class::<PyDynamicChargeRow>()?;
    m.add_class::<PyDynamicSpeciesRow>()?;
    Ok(())
}

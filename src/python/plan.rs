//! Bindings of the planning layer: `Scenario` (a checked scenario file) and `Report` (what
//! `Scenario.run` computes), each holding its core object, with named getters; rows of the
//! report are small read-only pyclasses, arrays are numpy arrays.

use std::collections::BTreeMap;
use std::sync::Mutex;

use numpy::{PyArray1, PyArray2, ToPyArray};
use pyo3::exceptions::PyTypeError;
use pyo3::prelude::*;

use super::convert::type_name;
use super::photon_beam::PyChargeThreshold;
use super::{guard, to_py};
use crate::plan::{self, EnergyScan, ExtractionChoice, Report, Scenario, SourceSettings, CAUTIONS};
use crate::sources::plasma::Confinement;

// ---------------------------------------------------------------- the scenario

/// The target ion: one isotope at one charge state.
#[pyclass(name = "ScenarioTarget", module = "chargecast", frozen, get_all)]
#[derive(Clone)]
pub(crate) struct PyTarget {
    isotope: String,
    symbol: String,
    z: u32,
    mass_number: u32,
    charge: u32,
    /// e.g. "129Xe43+".
    label: String,
}

/// One species put into the source.
#[pyclass(name = "ScenarioSpecies", module = "chargecast", frozen, get_all)]
#[derive(Clone)]
pub(crate) struct PySpecies {
    name: String,
    symbol: String,
    z: u32,
    mass_number: Option<u32>,
    amount: f64,
    initial_charge: u32,
}

impl From<&plan::SpeciesEntry> for PySpecies {
    fn from(s: &plan::SpeciesEntry) -> Self {
        PySpecies {
            name: s.name.clone(),
            symbol: s.symbol.clone(),
            z: s.z,
            mass_number: s.mass_number,
            amount: s.amount,
            initial_charge: s.initial_charge,
        }
    }
}

/// Settings of the scenario's source; fields that do not apply to its kind are None.
#[pyclass(name = "SourceSettings", module = "chargecast", frozen, get_all)]
#[derive(Clone, Default)]
pub(crate) struct PySourceSettings {
    kind: String,
    energy_ev: Option<f64>,
    current_a: Option<f64>,
    radius_m: Option<f64>,
    current_density_a_cm2: Option<f64>,
    magnetic_field_t: Option<f64>,
    cathode_radius_m: Option<f64>,
    cathode_temperature_k: Option<f64>,
    cathode_field_t: Option<f64>,
    length_m: Option<f64>,
    ion_temperature_ev: Option<f64>,
    gas_temperature_k: Option<f64>,
    compensation: Option<f64>,
    processes: Option<Vec<String>>,
    photon_energy_ev: Option<f64>,
    flux_cm2_s: Option<f64>,
    bandwidth_ev: Option<f64>,
    energy_spread_ev: Option<f64>,
    /// Beam trap: "fixed" or "dynamic"; the dynamic model's settings (None otherwise).
    model: Option<String>,
    axial_barrier_v: Option<f64>,
    drift_tube_radius_m: Option<f64>,
    gas_feed_pa: Option<BTreeMap<String, f64>>,
    dynamic_processes: Option<Vec<String>>,
    injected_atoms: Option<f64>,
    /// Plasma: the electron distribution, density and confinement, the gas and the
    /// extraction (None for other kinds).
    electron_temperature_ev: Option<f64>,
    hot_electron_temperature_ev: Option<f64>,
    hot_electron_fraction: Option<f64>,
    electron_density_cm3: Option<f64>,
    /// τ₁ (one value, with ``confinement_exponent``) or one time per charge 1, 2, … (s).
    confinement_time_s: Option<Vec<f64>>,
    confinement_exponent: Option<f64>,
    neutral_residence_time_s: Option<f64>,
    wall_recycling: Option<f64>,
    plasma_volume_m3: Option<f64>,
    extraction_fraction: Option<f64>,
}

impl From<&SourceSettings> for PySourceSettings {
    fn from(s: &SourceSettings) -> Self {
        let kind = s.kind().to_string();
        match s {
            SourceSettings::BeamTrap(t) => PySourceSettings {
                kind,
                energy_ev: Some(t.energy_ev),
                current_a: Some(t.current_a),
                radius_m: t.radius_m,
                current_density_a_cm2: t.current_density_a_cm2,
                magnetic_field_t: t.magnetic_field_t,
                cathode_radius_m: t.cathode_radius_m,
                cathode_temperature_k: t.cathode_temperature_k,
                cathode_field_t: Some(t.cathode_field_t),
                length_m: Some(t.length_m),
                ion_temperature_ev: Some(t.ion_temperature_ev),
                gas_temperature_k: Some(t.gas_temperature_k),
                compensation: Some(t.compensation),
                processes: Some(t.processes.clone()),
                model: Some(t.model.clone()),
                axial_barrier_v: t.axial_barrier_v,
                drift_tube_radius_m: t.drift_tube_radius_m,
                gas_feed_pa: t
                    .is_dynamic()
                    .then(|| t.gas_feed_pa.iter().cloned().collect()),
                dynamic_processes: t.dynamic_processes.clone(),
                injected_atoms: t.injected_atoms,
                ..Default::default()
            },
            SourceSettings::PhotonBeam(p) => PySourceSettings {
                kind,
                photon_energy_ev: Some(p.photon_energy_ev),
                flux_cm2_s: Some(p.flux_cm2_s),
                bandwidth_ev: p.bandwidth_ev,
                ..Default::default()
            },
            SourceSettings::ElectronImpact(e) => PySourceSettings {
                kind,
                energy_ev: Some(e.energy_ev),
                energy_spread_ev: Some(e.energy_spread_ev),
                ..Default::default()
            },
            SourceSettings::Plasma(p) => {
                let (times, exponent) = match &p.confinement {
                    Confinement::Scaling { tau1_s, exponent } => (vec![*tau1_s], Some(*exponent)),
                    Confinement::PerCharge(t) => (t.clone(), None),
                };
                PySourceSettings {
                    kind,
                    electron_temperature_ev: Some(p.electron_temperature_ev),
                    hot_electron_temperature_ev: p.hot_electron_temperature_ev,
                    hot_electron_fraction: Some(p.hot_electron_fraction),
                    electron_density_cm3: Some(p.electron_density_cm3),
                    confinement_time_s: Some(times),
                    confinement_exponent: exponent,
                    gas_feed_pa: Some(p.gas_feed_pa.iter().cloned().collect()),
                    ion_temperature_ev: Some(p.ion_temperature_ev),
                    gas_temperature_k: Some(p.gas_temperature_k),
                    neutral_residence_time_s: Some(p.neutral_residence_time_s),
                    wall_recycling: Some(p.wall_recycling),
                    plasma_volume_m3: Some(p.plasma_volume_m3),
                    extraction_fraction: Some(p.extraction_fraction),
                    ..Default::default()
                }
            }
        }
    }
}

/// Log-spaced confinement times and the extraction time (None: when the target peaks).
#[pyclass(name = "TimeGrid", module = "chargecast", frozen, get_all)]
#[derive(Clone)]
pub(crate) struct PyTimeGrid {
    start_s: f64,
    stop_s: f64,
    points: usize,
    extraction_s: Option<f64>,
}

/// Beam energies of the best-energy search; `scale` is "log" or "linear".
#[pyclass(name = "EnergyGrid", module = "chargecast", frozen, get_all)]
#[derive(Clone)]
pub(crate) struct PyEnergyGrid {
    start_ev: f64,
    stop_ev: f64,
    points: usize,
    scale: String,
}

/// The mass separator after the source.
#[pyclass(name = "SeparatorSettings", module = "chargecast", frozen, get_all)]
#[derive(Clone)]
pub(crate) struct PySeparator {
    resolving_power: f64,
    peak_shape: String,
    aq_half_width: Option<f64>,
    relative_half_width: Option<f64>,
    window_fwhm: f64,
    aq_range: Option<(f64, f64)>,
}

/// A checked scenario: every field of the file with its defaults filled in. Read one
/// with ``chargecast.load_scenario(path)`` or ``Scenario.from_text(text, filename)``.
#[pyclass(name = "Scenario", module = "chargecast", frozen, subclass)]
pub(crate) struct PyScenario {
    pub(crate) inner: Scenario,
}

#[pymethods]
impl PyScenario {
    /// Read and check a scenario (TOML text); ``filename`` names it in error messages.
    /// Raises ``ScenarioError`` naming the file, the line and the field.
    #[new]
    #[pyo3(signature = (text, filename=None), text_signature = "(text, filename='<scenario>')")]
    fn new(text: &Bound<'_, PyAny>, filename: Option<&Bound<'_, PyAny>>) -> PyResult<Self> {
        let text = str_arg("text", "the scenario's TOML text", text)?;
        let filename = match filename {
            Some(f) => str_arg("filename", "the name used in messages", f)?,
            None => "<scenario>".to_string(),
        };
        Ok(PyScenario {
            inner: plan::parse_scenario(&text, &filename)?,
        })
    }
    #[getter]
    fn file(&self) -> &str {
        &self.inner.file
    }
    #[getter]
    fn title(&self) -> &str {
        &self.inner.title
    }
    #[getter]
    fn description(&self) -> &str {
        &self.inner.description
    }
    #[getter]
    fn target(&self) -> PyTarget {
        let t = &self.inner.target;
        PyTarget {
            isotope: t.isotope.clone(),
            symbol: t.symbol.clone(),
            z: t.z,
            mass_number: t.mass_number,
            charge: t.charge,
            label: t.label(),
        }
    }
    #[getter]
    fn species(&self) -> Vec<PySpecies> {
        self.inner.species.iter().map(PySpecies::from).collect()
    }
    /// The species entry that provides the target isotope.
    #[getter]
    fn target_species(&self) -> PySpecies {
        PySpecies::from(self.inner.target_species())
    }
    #[getter]
    fn source(&self) -> PySourceSettings {
        (&self.inner.source).into()
    }
    /// Partial pressures (Pa) by gas formula.
    #[getter]
    fn residual_gas_pa(&self) -> BTreeMap<String, f64> {
        self.inner.residual_gas_pa.iter().cloned().collect()
    }
    /// Element shares of the residual-gas atoms (sum 1; empty without gas).
    #[getter]
    fn residual_elements(&self) -> BTreeMap<String, f64> {
        self.inner.residual_elements.iter().cloned().collect()
    }
    #[getter]
    fn time(&self) -> PyTimeGrid {
        let t = &self.inner.time;
        PyTimeGrid {
            start_s: t.start_s,
            stop_s: t.stop_s,
            points: t.points,
            extraction_s: t.extraction_s,
        }
    }
    #[getter]
    fn energy_scan(&self) -> PyEnergyGrid {
        let e = &self.inner.energy_scan;
        PyEnergyGrid {
            start_ev: e.start_ev,
            stop_ev: e.stop_ev,
            points: e.points,
            scale: if e.log { "log" } else { "linear" }.to_string(),
        }
    }
    #[getter]
    fn separator(&self) -> PySeparator {
        let s = &self.inner.separator;
        PySeparator {
            resolving_power: s.resolving_power,
            peak_shape: s.peak_shape.clone(),
            aq_half_width: s.aq_half_width,
            relative_half_width: s.relative_half_width,
            window_fwhm: s.window_fwhm,
            aq_range: s.aq_range,
        }
    }
    /// Line of every field and table in the file, by dotted path.
    #[getter]
    fn lines(&self) -> BTreeMap<String, usize> {
        self.inner.lines.clone()
    }
    /// The confinement-time grid (s), log-spaced.
    #[getter]
    fn times_s<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.inner.time.times_s())
    }
    /// The energy grid (eV) of the best-energy search.
    #[getter]
    fn energies_ev<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.inner.energy_scan.energies_ev())
    }
}

// ---------------------------------------------------------------- report rows

/// One step (q−1)+ → q+ of the breeding ladder.
#[pyclass(name = "LadderStep", module = "chargecast", frozen, get_all)]
#[derive(Clone)]
pub(crate) struct PyLadderStep {
    charge: u32,
    ionization_energy_ev: f64,
    threshold_ev: f64,
    subshell: Option<String>,
    cross_section_cm2: f64,
    breeding_time_s: Option<f64>,
    j_tau_c_cm2: Option<f64>,
}

/// The breeding ladder: beam energy, current density (beam trap), cross-section model.
#[pyclass(name = "Ladder", module = "chargecast", frozen, get_all)]
#[derive(Clone)]
pub(crate) struct PyLadder {
    energy_ev: f64,
    current_density_a_cm2: Option<f64>,
    cross_section_kind: String,
    steps: Vec<PyLadderStep>,
}

/// One charge state of the target element in the evolution summary.
#[pyclass(name = "ChargeSummary", module = "chargecast", frozen, get_all)]
#[derive(Clone)]
pub(crate) struct PyChargeSummary {
    charge: u32,
    peak_fraction: f64,
    peak_time_s: f64,
    final_fraction: f64,
    fraction_at_extraction: f64,
}

/// The charge-state evolution of one species: fractions [times, charge 0…Z].
#[pyclass(name = "SpeciesEvolution", module = "chargecast", frozen)]
pub(crate) struct PySpeciesEvolution {
    inner: plan::SpeciesEvolution,
}

#[pymethods]
impl PySpeciesEvolution {
    #[getter]
    fn name(&self) -> &str {
        &self.inner.name
    }
    #[getter]
    fn element(&self) -> &str {
        &self.inner.symbol
    }
    #[getter]
    fn times_s<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.inner.times_s.clone())
    }
    #[getter]
    fn fractions<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray2<f64>> {
        self.inner.fractions.to_pyarray(py)
    }
}

/// One element of a plasma source at steady state; arrays over charge 0…Z.
#[pyclass(name = "PlasmaElementState", module = "chargecast", frozen)]
pub(crate) struct PyPlasmaElement {
    inner: plan::PlasmaElement,
}

#[pymethods]
impl PyPlasmaElement {
    #[getter]
    fn symbol(&self) -> &str {
        &self.inner.symbol
    }
    /// Brought only by the residual gas.
    #[getter]
    fn residual(&self) -> bool {
        self.inner.residual
    }
    #[getter]
    fn atom_density_cm3(&self) -> f64 {
        self.inner.atom_density_cm3
    }
    #[getter]
    fn densities_cm3<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        self.inner.densities_cm3.to_pyarray(py)
    }
    #[getter]
    fn fractions<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        self.inner.fractions.to_pyarray(py)
    }
    #[getter]
    fn currents_eua<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        self.inner.currents_eua.to_pyarray(py)
    }
    #[getter]
    fn total_current_eua(&self) -> f64 {
        self.inner.total_current_eua
    }
    #[getter]
    fn mean_ion_charge(&self) -> f64 {
        self.inner.mean_ion_charge
    }
}

/// A plasma source at steady state: every element, the target's current, and the
/// steady-state scan over the cold electron temperature.
#[pyclass(name = "PlasmaReport", module = "chargecast", frozen)]
pub(crate) struct PyPlasmaReport {
    inner: plan::PlasmaReport,
}

#[pymethods]
impl PyPlasmaReport {
    /// Fed elements first, then residual-gas elements.
    #[getter]
    fn elements(&self) -> Vec<PyPlasmaElement> {
        self.inner
            .elements
            .iter()
            .map(|e| PyPlasmaElement { inner: e.clone() })
            .collect()
    }
    #[getter]
    fn electron_density_cm3(&self) -> f64 {
        self.inner.electron_density_cm3
    }
    #[getter]
    fn ion_charge_density_cm3(&self) -> f64 {
        self.inner.ion_charge_density_cm3
    }
    #[getter]
    fn isotope_share(&self) -> f64 {
        self.inner.isotope_share
    }
    #[getter]
    fn target_current_eua(&self) -> f64 {
        self.inner.target_current_eua
    }
    #[getter]
    fn scan_temperatures_ev<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        self.inner.scan_temperatures_ev.to_pyarray(py)
    }
    #[getter]
    fn scan_target_fraction<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        self.inner.scan_target_fraction.to_pyarray(py)
    }
    #[getter]
    fn scan_target_current_eua<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        self.inner.scan_target_current_eua.to_pyarray(py)
    }
    #[getter]
    fn best_temperature_ev(&self) -> f64 {
        self.inner.best_temperature_ev
    }
    #[getter]
    fn best_current_eua(&self) -> f64 {
        self.inner.best_current_eua
    }
}

/// Monte Carlo bands of the target (``[uncertainty]``): each triple is the 5th, 50th and
/// 95th percentile.
#[pyclass(name = "UncertaintyBands", module = "chargecast", frozen)]
pub(crate) struct PyUncertaintyBands {
    inner: plan::UncertaintyBands,
}

#[pymethods]
impl PyUncertaintyBands {
    #[getter]
    fn samples(&self) -> usize {
        self.inner.samples
    }
    #[getter]
    fn seed(&self) -> u64 {
        self.inner.seed
    }
    /// The factors as the scenario gave them (``ionization_factor``, ``recombination_factor``,
    /// ``charge_exchange_factor``, ``charge_correlation``).
    #[getter]
    fn factors(&self) -> BTreeMap<&'static str, f64> {
        let f = &self.inner.factors;
        BTreeMap::from([
            ("ionization_factor", f.ionization),
            ("recombination_factor", f.recombination),
            ("charge_exchange_factor", f.charge_exchange),
            ("charge_correlation", f.charge_correlation),
        ])
    }
    #[getter]
    fn peak_time_s(&self) -> (f64, f64, f64) {
        let [a, b, c] = self.inner.peak_time_s;
        (a, b, c)
    }
    #[getter]
    fn peak_fraction(&self) -> (f64, f64, f64) {
        let [a, b, c] = self.inner.peak_fraction;
        (a, b, c)
    }
    #[getter]
    fn ions_per_extraction(&self) -> (f64, f64, f64) {
        let [a, b, c] = self.inner.ions_per_extraction;
        (a, b, c)
    }
    /// [3, T]: the target fraction's 5th, 50th and 95th percentile at every time.
    #[getter]
    fn target_fraction<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyArray2<f64>>> {
        let rows: Vec<Vec<f64>> = self.inner.target_fraction.to_vec();
        Ok(PyArray2::from_vec2(py, &rows)?)
    }
}

/// Ions per extraction of a beam trap.
#[pyclass(name = "IonsPerExtraction", module = "chargecast", frozen)]
pub(crate) struct PyIons {
    inner: plan::IonsPerExtraction,
}

#[pymethods]
impl PyIons {
    #[getter]
    fn time_s(&self) -> f64 {
        self.inner.time_s
    }
    #[getter]
    fn electrons_in_trap(&self) -> f64 {
        self.inner.electrons_in_trap
    }
    #[getter]
    fn compensation(&self) -> f64 {
        self.inner.compensation
    }
    #[getter]
    fn species(&self) -> &str {
        &self.inner.species
    }
    #[getter]
    fn species_share_of_charge(&self) -> f64 {
        self.inner.species_share_of_charge
    }
    #[getter]
    fn isotope_share(&self) -> f64 {
        self.inner.isotope_share
    }
    /// Ions of the target isotope per extraction at each charge 0…Z.
    #[getter]
    fn per_charge<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.inner.per_charge.clone())
    }
    #[getter]
    fn target(&self) -> f64 {
        self.inner.target
    }
    #[getter]
    fn all_charges(&self) -> f64 {
        self.inner.all_charges
    }
}

/// The best-energy search: ``kind`` "map" (target fraction over energy × time) or
/// "appearance" (partial cross sections of one collision over energy).
#[pyclass(name = "BestEnergy", module = "chargecast", frozen)]
pub(crate) struct PyBestEnergy {
    inner: EnergyScan,
}

#[pymethods]
impl PyBestEnergy {
    #[getter]
    fn kind(&self) -> &str {
        match self.inner {
            EnergyScan::Map(_) => "map",
            EnergyScan::Appearance(_) => "appearance",
        }
    }
    #[getter]
    fn energies_ev<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.inner.energies_ev().to_vec())
    }
    #[getter]
    fn best_energy_ev(&self) -> f64 {
        self.inner.best_energy_ev()
    }
    #[getter]
    fn best_time_s(&self) -> Option<f64> {
        self.inner.best_time_s()
    }
    #[getter]
    fn best_fraction(&self) -> f64 {
        self.inner.best_fraction()
    }
    /// Times (s) of the map (None for a single collision).
    #[getter]
    fn times_s<'py>(&self, py: Python<'py>) -> Option<Bound<'py, PyArray1<f64>>> {
        match &self.inner {
            EnergyScan::Map(m) => Some(to_py(py, m.times_s.clone())),
            EnergyScan::Appearance(_) => None,
        }
    }
    /// Target fraction [energies, times] (None for a single collision).
    #[getter]
    fn fraction<'py>(&self, py: Python<'py>) -> Option<Bound<'py, PyArray2<f64>>> {
        match &self.inner {
            EnergyScan::Map(m) => {
                let rows = m.fraction.len();
                let cols = m.times_s.len();
                let flat: Vec<f64> = m.fraction.iter().flatten().copied().collect();
                ndarray::Array2::from_shape_vec((rows, cols), flat)
                    .ok()
                    .map(|a| a.to_pyarray(py))
            }
            EnergyScan::Appearance(_) => None,
        }
    }
    /// Partial cross sections (cm²) [energies, charge 0…Z] (single collision only).
    #[getter]
    fn cross_sections_cm2<'py>(&self, py: Python<'py>) -> Option<Bound<'py, PyArray2<f64>>> {
        self.appearance()
            .map(|a| a.cross_sections_cm2.to_pyarray(py))
    }
    #[getter]
    fn target_cross_section_cm2<'py>(&self, py: Python<'py>) -> Option<Bound<'py, PyArray1<f64>>> {
        self.appearance()
            .map(|a| to_py(py, a.target_cross_section_cm2.clone()))
    }
    #[getter]
    fn target_share<'py>(&self, py: Python<'py>) -> Option<Bound<'py, PyArray1<f64>>> {
        self.appearance().map(|a| to_py(py, a.target_share.clone()))
    }
    #[getter]
    fn best_cross_section_cm2(&self) -> Option<f64> {
        self.appearance().map(|a| a.best_cross_section_cm2)
    }
    #[getter]
    fn own_energy_ev(&self) -> Option<f64> {
        self.appearance().map(|a| a.own_energy_ev)
    }
    /// Grid index nearest to the scenario's energy (single collision only).
    #[getter]
    fn own_index(&self) -> Option<usize> {
        self.appearance().map(|a| a.own_index)
    }
}

impl PyBestEnergy {
    fn appearance(&self) -> Option<&plan::AppearanceScan> {
        match &self.inner {
            EnergyScan::Appearance(a) => Some(a),
            EnergyScan::Map(_) => None,
        }
    }
}

/// The A/q lines of the report as columns (numpy arrays; labels as lists of str).
#[pyclass(name = "LineColumns", module = "chargecast", frozen, get_all)]
pub(crate) struct PyLineColumns {
    label: Vec<String>,
    isotope: Vec<String>,
    z: Vec<u32>,
    mass_number: Vec<u32>,
    charge: Vec<u32>,
    mass_u: Py<PyArray1<f64>>,
    m_over_q: Py<PyArray1<f64>>,
    a_over_q: Py<PyArray1<f64>>,
    intensity: Py<PyArray1<f64>>,
    residual: Vec<bool>,
}

/// A line near the target and what it does to the target's window.
#[pyclass(name = "Interferer", module = "chargecast", frozen, get_all)]
#[derive(Clone)]
pub(crate) struct PyInterferer {
    ion: String,
    m_over_q: f64,
    a_over_q: f64,
    intensity: f64,
    residual_gas: bool,
    delta_m_over_q: f64,
    separation_fwhm: f64,
    contamination: f64,
    resolving_power_needed: f64,
}

/// The target's A/q neighbourhood at the separator's resolving power.
#[pyclass(name = "Neighbourhood", module = "chargecast", frozen, get_all)]
#[derive(Clone)]
pub(crate) struct PyNeighbourhood {
    target: String,
    m_over_q: f64,
    a_over_q: f64,
    resolving_power: f64,
    peak_shape: String,
    fwhm: f64,
    window: (f64, f64),
    purity: f64,
    interferers: Vec<PyInterferer>,
    /// Resolving power that splits every interferer above 1 % contamination (None: none).
    resolving_power_needed: Option<f64>,
    resolved: bool,
}

/// One charge state of the target isotope, ranked by fraction × purity.
#[pyclass(name = "RankedCharge", module = "chargecast", frozen, get_all)]
#[derive(Clone)]
pub(crate) struct PyRanked {
    charge: u32,
    ion: String,
    a_over_q: f64,
    m_over_q: f64,
    fraction: f64,
    purity: f64,
    score: f64,
    main_contaminant: Option<String>,
    main_contaminant_share: f64,
    /// In the separator's A/q range and at least 0.1 % of the isotope's ions.
    eligible: bool,
}

/// The recommended charge state of the target isotope.
#[pyclass(name = "Recommendation", module = "chargecast", frozen, get_all)]
#[derive(Clone)]
pub(crate) struct PyRecommendation {
    charge: u32,
    label: String,
    a_over_q: f64,
    m_over_q: f64,
    fraction: f64,
    purity: f64,
    score: f64,
    main_contaminant: Option<String>,
    /// Time (s) and fraction of its own peak when it is not the target (time sources).
    peak_time_s: Option<f64>,
    peak_fraction: Option<f64>,
}

/// The best energy and time averaged over the beam's energy spread, with its flags.
#[pyclass(name = "RobustOptimum", module = "chargecast", frozen, get_all)]
#[derive(Clone)]
pub(crate) struct PyRobustOptimum {
    spread_ev: f64,
    energy_ev: f64,
    time_s: f64,
    fraction: f64,
    sharp_energy_ev: f64,
    on_scan_edge: bool,
    at_last_time: bool,
    near_threshold: bool,
    sharp_near_threshold: bool,
    /// Charge the next ionization threshold above the optimum opens (None: none).
    next_threshold_charge: Option<u32>,
    next_threshold_ev: Option<f64>,
    margin_ev: Option<f64>,
    tube_voltage_v: Option<f64>,
}

/// A plausibility warning: what is checked, the value, its unit, the range the models
/// were made for (with its source) and the whole message.
#[pyclass(name = "ModelWarning", module = "chargecast", frozen, get_all)]
#[derive(Clone)]
pub(crate) struct PyModelWarning {
    what: String,
    value: f64,
    unit: String,
    range: String,
    message: String,
}

impl PyModelWarning {
    fn from_core(w: &plan::Warning) -> Self {
        PyModelWarning {
            what: w.what.to_string(),
            value: w.value,
            unit: w.unit.to_string(),
            range: w.range.clone(),
            message: w.message.clone(),
        }
    }
}

/// The electron beam of the report's trap as built from the scenario.
#[pyclass(name = "ReportBeam", module = "chargecast", frozen, get_all)]
#[derive(Clone)]
pub(crate) struct PyReportBeam {
    energy_ev: f64,
    current_a: f64,
    radius_m: f64,
    current_density_a_cm2: f64,
}

// ---------------------------------------------------------------- the report

/// Everything a plan shows, computed in the core by ``Scenario.run``.
#[pyclass(name = "Report", module = "chargecast", frozen, subclass)]
pub(crate) struct PyReport {
    pub(crate) inner: Report,
}

#[pymethods]
impl PyReport {
    /// Run a scenario (the GIL is released; ``progress(done, total, what)`` is called
    /// during the energy scan, with the GIL).
    #[new]
    #[pyo3(signature = (scenario, progress=None))]
    fn new(
        py: Python<'_>,
        scenario: &Bound<'_, PyAny>,
        progress: Option<Py<PyAny>>,
    ) -> PyResult<Self> {
        let scenario: PyRef<'_, PyScenario> = scenario.extract().map_err(|_| {
            PyTypeError::new_err(format!(
                "scenario: must be a Scenario (from load_scenario), got {}",
                type_name(scenario)
            ))
        })?;
        let failed: Mutex<Option<PyErr>> = Mutex::new(None);
        let scenario = &scenario.inner;
        let report = guard(py, || {
            plan::run(scenario, &mut |done, total, what| {
                if let Some(cb) = &progress {
                    Python::attach(|py| {
                        if let Err(e) = cb.bind(py).call1((done, total, what)) {
                            let mut slot = failed.lock().unwrap_or_else(|p| p.into_inner());
                            slot.get_or_insert(e);
                            // Stop the run at its next check instead of finishing it: the
                            // callback's exception is often KeyboardInterrupt, raised by
                            // Python's signal handler while the callback was running.
                            crate::interrupt::cancel();
                        }
                    });
                }
            })
        });
        if let Some(e) = failed.into_inner().unwrap_or_else(|p| p.into_inner()) {
            // This call set the flag (above); every worker has stopped by now.
            crate::interrupt::reset();
            return Err(e);
        }
        let report = report?;
        super::errors::warn_all(py, &report.warnings)?;
        Ok(PyReport { inner: report })
    }
    #[getter]
    fn _scenario(&self) -> PyScenario {
        PyScenario {
            inner: self.inner.scenario.clone(),
        }
    }
    /// The electron beam of a beam trap as built (None for other sources).
    #[getter]
    fn beam(&self) -> Option<PyReportBeam> {
        match &self.inner.source {
            crate::sources::Source::BeamTrap(t) => {
                let b = &t.beam;
                Some(PyReportBeam {
                    energy_ev: b.energy_ev,
                    current_a: b.current_a,
                    radius_m: b.radius_m,
                    current_density_a_cm2: crate::sources::electron_beam::current_density_a_cm2(
                        b.current_a,
                        b.radius_m,
                    ),
                })
            }
            _ => None,
        }
    }
    #[getter]
    fn ladder(&self) -> PyLadder {
        let l = &self.inner.ladder;
        PyLadder {
            energy_ev: l.energy_ev,
            current_density_a_cm2: l.current_density_a_cm2,
            cross_section_kind: l.cross_section_kind.to_string(),
            steps: l
                .steps
                .iter()
                .map(|s| PyLadderStep {
                    charge: s.charge,
                    ionization_energy_ev: s.ionization_energy_ev,
                    threshold_ev: s.threshold_ev,
                    subshell: s.subshell.clone(),
                    cross_section_cm2: s.cross_section_cm2,
                    breeding_time_s: s.breeding_time_s,
                    j_tau_c_cm2: s.j_tau_c_cm2,
                })
                .collect(),
        }
    }
    /// Charges one photon makes from the neutral target atom (photon beam; else None).
    #[getter]
    fn photon_thresholds(&self) -> Option<Vec<PyChargeThreshold>> {
        self.inner.photon_thresholds.as_ref().map(|rows| {
            rows.iter()
                .cloned()
                .map(PyChargeThreshold::from_core)
                .collect()
        })
    }
    /// Evolutions per species (empty for a single collision).
    #[getter]
    fn evolutions(&self) -> Vec<PySpeciesEvolution> {
        self.inner
            .evolutions
            .iter()
            .map(|e| PySpeciesEvolution { inner: e.clone() })
            .collect()
    }
    /// The evolution of the species that provides the target (None for a single collision).
    #[getter]
    fn target_evolution(&self) -> Option<PySpeciesEvolution> {
        self.inner
            .target_evolution()
            .map(|e| PySpeciesEvolution { inner: e.clone() })
    }
    /// Extraction time (s); None for a single collision.
    #[getter]
    fn extraction_time_s(&self) -> Option<f64> {
        self.inner.extraction.map(|e| e.0)
    }
    /// "scenario" or "peak of the target" (None for a single collision).
    #[getter]
    fn extraction_chosen(&self) -> Option<&'static str> {
        self.inner.extraction.map(|e| match e.1 {
            ExtractionChoice::Scenario => ExtractionChoice::Scenario.label(),
            ExtractionChoice::TargetPeak => ExtractionChoice::TargetPeak.label(),
        })
    }
    /// Per species name: fractions of charge 0…Z at extraction (single collision: yields).
    #[getter]
    fn fractions_at_extraction<'py>(
        &self,
        py: Python<'py>,
    ) -> BTreeMap<String, Bound<'py, PyArray1<f64>>> {
        self.inner
            .fractions_at_extraction
            .iter()
            .map(|f| (f.name.clone(), to_py(py, f.fractions.clone())))
            .collect()
    }
    /// The species names in scenario order (the keys of ``fractions_at_extraction``).
    #[getter]
    fn species_names(&self) -> Vec<String> {
        self.inner
            .fractions_at_extraction
            .iter()
            .map(|f| f.name.clone())
            .collect()
    }
    #[getter]
    fn evolution_summary(&self) -> Vec<PyChargeSummary> {
        self.inner
            .evolution_summary
            .iter()
            .map(|r| PyChargeSummary {
                charge: r.charge,
                peak_fraction: r.peak_fraction,
                peak_time_s: r.peak_time_s,
                final_fraction: r.final_fraction,
                fraction_at_extraction: r.fraction_at_extraction,
            })
            .collect()
    }
    #[getter]
    fn mean_charge_at_extraction(&self) -> Option<f64> {
        self.inner.mean_charge_at_extraction
    }
    /// Time (s) and fraction of the target's peak at the scenario's settings.
    #[getter]
    fn target_peak(&self) -> Option<(f64, f64)> {
        self.inner.target_peak
    }
    /// The energy scan as the bindings' result object: an ``EnergyScan`` (beam trap),
    /// ``PhotonEnergyScan`` (photon beam) or ``AppearanceCurves`` (electron impact), with
    /// their plots and tables.
    fn energy_scan<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyAny>> {
        let target = &self.inner.scenario.target;
        let element = crate::atoms::element(&target.symbol)?;
        match (&self.inner.energy_scan, &self.inner.source) {
            (plan::EnergyScan::Map(map), source) => {
                let name = match source {
                    crate::sources::Source::PhotonBeam(_) => "PhotonEnergyScan",
                    _ => "EnergyScan",
                };
                super::energy_scan::PyEnergyScan::result(
                    py,
                    name,
                    element,
                    vec![target.charge],
                    map.clone(),
                )
            }
            (plan::EnergyScan::Appearance(a), source) => {
                let spread = match source {
                    crate::sources::Source::ElectronImpact(s) => s.energy_spread_ev,
                    _ => 0.0,
                };
                super::electron_impact::curves_result(
                    py,
                    element,
                    a.energies_ev.clone(),
                    spread,
                    a.cross_sections_cm2.clone(),
                )
            }
        }
    }
    /// The evolution of species ``name`` (as in the scenario, e.g. ``"129Xe"``) as an
    /// ``Evolution`` with its plots and tables; None for an electron-impact source.
    fn evolution<'py>(&self, py: Python<'py>, name: &str) -> PyResult<Option<Bound<'py, PyAny>>> {
        let Some(e) = self.inner.evolutions.iter().find(|e| e.name == name) else {
            return Ok(None);
        };
        let element = crate::atoms::element(&e.symbol)?;
        super::evolution::PyEvolution::result(
            py,
            element,
            e.times_s.clone(),
            e.fractions.clone(),
            e.name.clone(),
        )
        .map(Some)
    }
    #[getter]
    fn best_energy(&self) -> PyBestEnergy {
        PyBestEnergy {
            inner: self.inner.energy_scan.clone(),
        }
    }
    /// The spread-averaged optimum (beam trap; None for other sources).
    #[getter]
    fn robust_optimum(&self) -> Option<PyRobustOptimum> {
        self.inner.robust_optimum.as_ref().map(|r| PyRobustOptimum {
            spread_ev: r.spread_ev,
            energy_ev: r.energy_ev,
            time_s: r.time_s,
            fraction: r.fraction,
            sharp_energy_ev: r.sharp_energy_ev,
            on_scan_edge: r.on_scan_edge,
            at_last_time: r.at_last_time,
            near_threshold: r.near_threshold,
            sharp_near_threshold: r.sharp_near_threshold,
            next_threshold_charge: r.next_threshold.map(|t| t.0),
            next_threshold_ev: r.next_threshold.map(|t| t.1),
            margin_ev: r.margin_ev,
            tube_voltage_v: r.tube_voltage_v,
        })
    }
    /// The radioactive-beam breeding cycle (``[injection]``), None without one.
    #[getter]
    fn injection<'py>(&self, py: Python<'py>) -> PyResult<Option<Bound<'py, PyAny>>> {
        match (&self.inner.injection, &self.inner.scenario.injection) {
            (Some(result), Some(cycle)) => Ok(Some(super::rib_cycle::PyBreedingCycle::result(
                py,
                result.clone(),
                cycle.breeding_time_s,
            )?)),
            _ => Ok(None),
        }
    }
    #[getter]
    fn ions(&self) -> Option<PyIons> {
        self.inner.ions.clone().map(|inner| PyIons { inner })
    }
    #[getter]
    fn aq_lines(&self, py: Python<'_>) -> PyLineColumns {
        let lines = self.inner.lines.lines();
        let col = |f: &dyn Fn(&crate::spectrum::Line) -> f64| -> Py<PyArray1<f64>> {
            to_py(py, lines.iter().map(f).collect()).unbind()
        };
        PyLineColumns {
            label: lines.iter().map(|l| l.label()).collect(),
            isotope: lines.iter().map(|l| l.isotope_label()).collect(),
            z: lines.iter().map(|l| l.z).collect(),
            mass_number: lines.iter().map(|l| l.mass_number).collect(),
            charge: lines.iter().map(|l| l.charge).collect(),
            mass_u: col(&|l| l.mass_u),
            m_over_q: col(&|l| l.m_over_q),
            a_over_q: col(&|l| l.a_over_q),
            intensity: col(&|l| l.intensity),
            residual: lines.iter().map(|l| l.residual).collect(),
        }
    }
    #[getter]
    fn neighbourhood(&self) -> Option<PyNeighbourhood> {
        let n = self.inner.neighbourhood.as_ref()?;
        let o = &n.overlap;
        Some(PyNeighbourhood {
            target: o.target.label(),
            m_over_q: o.target.m_over_q,
            a_over_q: o.target.a_over_q,
            resolving_power: o.settings.peaks.resolving_power,
            peak_shape: o.settings.peaks.shape.label().to_string(),
            fwhm: o.fwhm,
            window: o.window,
            purity: o.purity,
            interferers: o
                .interferences
                .iter()
                .map(|i| PyInterferer {
                    ion: i.line.label(),
                    m_over_q: i.line.m_over_q,
                    a_over_q: i.line.a_over_q,
                    intensity: i.line.intensity,
                    residual_gas: i.line.residual,
                    delta_m_over_q: i.delta_m_over_q,
                    separation_fwhm: i.separation_fwhm,
                    contamination: i.contamination,
                    resolving_power_needed: i.resolving_power_needed,
                })
                .collect(),
            resolving_power_needed: n.resolving_power_needed,
            resolved: n.resolved,
        })
    }
    #[getter]
    fn ranking(&self) -> Vec<PyRanked> {
        self.inner
            .ranking
            .iter()
            .map(|r| {
                let (k, l) = (&r.rank, &r.rank.line);
                PyRanked {
                    charge: l.charge,
                    ion: l.label(),
                    a_over_q: l.a_over_q,
                    m_over_q: l.m_over_q,
                    fraction: k.fraction,
                    purity: k.purity,
                    score: k.score,
                    main_contaminant: k.main_contaminant.as_ref().map(|c| c.label()),
                    main_contaminant_share: k.main_contaminant_share,
                    eligible: r.eligible,
                }
            })
            .collect()
    }
    #[getter]
    fn recommended(&self) -> Option<PyRecommendation> {
        self.inner.recommended.as_ref().map(|r| PyRecommendation {
            charge: r.charge,
            label: r.label.clone(),
            a_over_q: r.a_over_q,
            m_over_q: r.m_over_q,
            fraction: r.fraction,
            purity: r.purity,
            score: r.score,
            main_contaminant: r.main_contaminant.clone(),
            peak_time_s: r.own_peak.map(|p| p.0),
            peak_fraction: r.own_peak.map(|p| p.1),
        })
    }
    #[getter]
    fn notes(&self) -> Vec<String> {
        self.inner.notes.clone()
    }
    /// Plausibility warnings (also raised as ``ChargecastWarning`` when the report is made).
    #[getter]
    fn warnings(&self) -> Vec<PyModelWarning> {
        self.inner
            .warnings
            .iter()
            .map(PyModelWarning::from_core)
            .collect()
    }
    /// Printed at the end of every report.
    #[getter]
    fn cautions(&self) -> &'static str {
        CAUTIONS
    }
    /// The model of the evolution: "fixed" or "dynamic" (beam trap), "fixed" (photon
    /// beam), "single_collision" (electron impact), "plasma_balance" (plasma).
    #[getter]
    fn model(&self) -> &'static str {
        self.inner.model()
    }
    /// A plasma source's steady state, currents (eµA) and temperature scan (else None).
    #[getter]
    fn plasma(&self) -> Option<PyPlasmaReport> {
        self.inner
            .plasma
            .clone()
            .map(|inner| PyPlasmaReport { inner })
    }
    /// Monte Carlo bands of the target (``[uncertainty]``; else None).
    #[getter]
    fn uncertainty(&self) -> Option<PyUncertaintyBands> {
        self.inner
            .uncertainty
            .clone()
            .map(|inner| PyUncertaintyBands { inner })
    }
    /// What the ion-dynamics model adds (model "dynamic"; else None).
    #[getter]
    fn dynamics(&self) -> Option<super::plan_dynamics::PyDynamicReport> {
        self.inner
            .dynamics
            .clone()
            .map(super::plan_dynamics::PyDynamicReport::new)
    }
}

/// A str argument, or a TypeError naming the parameter.
fn str_arg(name: &str, what: &str, value: &Bound<'_, PyAny>) -> PyResult<String> {
    value.extract::<String>().map_err(|_| {
        PyTypeError::new_err(format!(
            "{name}: must be a str ({what}), got {}",
            type_name(value)
        ))
    })
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<PyScenario>()?;
    m.add_class::<PyReport>()?;
    m.add_class::<PyTarget>()?;
    m.add_class::<PySpecies>()?;
    m.add_class::<PySourceSettings>()?;
    m.add_class::<PyTimeGrid>()?;
    m.add_class::<PyEnergyGrid>()?;
    m.add_class::<PySeparator>()?;
    m.add_class::<PyLadder>()?;
    m.add_class::<PyLadderStep>()?;
    m.add_class::<PyChargeSummary>()?;
    m.add_class::<PySpeciesEvolution>()?;
    m.add_class::<PyIons>()?;
    m.add_class::<PyPlasmaElement>()?;
    m.add_class::<PyPlasmaReport>()?;
    m.add_class::<PyUncertaintyBands>()?;
    m.add_class::<PyBestEnergy>()?;
    m.add_class::<PyLineColumns>()?;
    m.add_class::<PyInterferer>()?;
    m.add_class::<PyNeighbourhood>()?;
    m.add_class::<PyRanked>()?;
    m.add_class::<PyRecommendation>()?;
    m.add_class::<PyReportBeam>()?;
    m.add("MAX_SCENARIO_BYTES", crate::plan::MAX_SCENARIO_BYTES)?;
    // The percentiles of every Monte Carlo band, defined once in the core.
    m.add(
        "BAND_PERCENTILES",
        crate::plan::defaults::BAND_PERCENTILES.to_vec(),
    )?;
    m.add_class::<PyModelWarning>()?;
    m.add_class::<PyRobustOptimum>()?;
    Ok(())
}

//! Bindings of the beam trap's ion-dynamics model: the run (particles, temperatures, escape
//! fluxes, overlaps per species; compensation and well depth; the bookkeeping) and the
//! right-hand side itself, for checks against scipy.

use numpy::{PyArray1, PyArray2};
use pyo3::prelude::*;

use super::beam_trap::PyBeamTrap;
use super::convert::float_dict_arg;
use super::{matrix_to_py, to_py};
use crate::error::Error;
use crate::solve::stiff::StiffSystem;
use crate::sources::beam_trap::BeamTrap;
use crate::sources::trap_dynamics::{default_load, DynamicRun, DynamicsSwitches, DEFAULT_RTOL};

/// The dynamic processes named by `value` (a sequence of names from
/// `DynamicsSwitches::NAMES`), or None for the defaults.
pub(crate) fn dynamic_processes_arg(
    value: Option<&Bound<'_, PyAny>>,
) -> PyResult<Option<DynamicsSwitches>> {
    let Some(value) = value.filter(|v| !v.is_none()) else {
        return Ok(None);
    };
    let wrong = || {
        Error::invalid(
            "dynamic_processes",
            super::convert::type_name(value),
            &format!(
                "must be a sequence of names from \"{}\"",
                DynamicsSwitches::NAMES.join("\", \"")
            ),
        )
    };
    if value.is_instance_of::<pyo3::types::PyString>() {
        return Err(wrong().into());
    }
    let names: Vec<String> = value.extract().map_err(|_| wrong())?;
    Ok(Some(DynamicsSwitches::from_names(&names)?))
}

/// Species loads of a dynamic run: a dict {species: atoms}, or one species name (which
/// loads the default trace amount).
pub(crate) fn loads_arg(
    trap: &BeamTrap,
    species: &Bound<'_, PyAny>,
) -> PyResult<Vec<(String, f64)>> {
    if let Ok(name) = species.extract::<String>() {
        return Ok(vec![(name, default_load(trap))]);
    }
    if species.is_instance_of::<pyo3::types::PyInt>() {
        let el = super::element_arg(species)?;
        return Ok(vec![(el.symbol().to_string(), default_load(trap))]);
    }
    float_dict_arg(
        "species",
        Some(species),
        "must be a species name or a dict {species: atoms at t = 0}",
    )
}

/// The result of the ion-dynamics model in a beam trap: particles, temperatures, escape
/// fluxes and overlaps of every species and charge over time; compensation and well depth;
/// the particle and energy bookkeeping. Made by ``BeamTrap.evolve`` and
/// ``BeamTrap.steady_state`` of a trap with ``model="dynamic"``.
#[pyclass(name = "DynamicRun", module = "chargecast", frozen, subclass)]
pub(crate) struct PyDynamicRun {
    inner: DynamicRun,
}

impl PyDynamicRun {
    /// A DynamicRun object (the Python package's class when it is loaded).
    pub(crate) fn result(py: Python<'_>, inner: DynamicRun) -> PyResult<Bound<'_, PyAny>> {
        super::results::into_result(py, "DynamicRun", PyDynamicRun { inner })
    }

    fn history(&self, species: &str) -> PyResult<&crate::sources::trap_dynamics::SpeciesHistory> {
        self.inner.species(species).ok_or_else(|| {
            let names: Vec<&str> = self
                .inner
                .species
                .iter()
                .map(|s| s.label.as_str())
                .collect();
            Error::invalid(
                "species",
                format!("{species:?}"),
                &format!("the run holds {}", names.join(", ")),
            )
            .into()
        })
    }
}

#[pymethods]
impl PyDynamicRun {
    #[new]
    fn new() -> PyResult<Self> {
        super::results::staged("DynamicRun", "BeamTrap.evolve with model=\"dynamic\"")
    }
    /// The model that made the run: ``"dynamic"``.
    #[getter]
    fn model(&self) -> &'static str {
        self.inner.model()
    }
    /// For a steady state, how it was found (``"newton"`` or ``"long solve"``); None for an
    /// evolution.
    #[getter]
    fn steady_method(&self) -> Option<&'static str> {
        self.inner.steady_method.map(|m| m.name())
    }
    /// Electrons in the trap, N_e = I·L/(e·v).
    #[getter]
    fn electrons_in_trap(&self) -> f64 {
        self.inner.electrons_in_trap
    }
    /// Atoms injected at t = 0 (all species).
    #[getter]
    fn initial_particles(&self) -> f64 {
        self.inner.bookkeeping.initial_particles
    }
    /// Ions made from the fed gases since t = 0 [T] (a steady state: per second).
    #[getter]
    fn fed<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.inner.bookkeeping.fed.to_vec())
    }
    /// Particles escaped since t = 0 [T] (a steady state: per second).
    #[getter]
    fn escaped<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.inner.bookkeeping.escaped.to_vec())
    }
    /// Particles in the trap [T].
    #[getter]
    fn trapped<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.inner.bookkeeping.trapped.to_vec())
    }
    /// Thermal energy (eV) brought in by beam heating, ionization heating and the feed [T]
    /// (a steady state: eV/s).
    #[getter]
    fn energy_in_ev<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.inner.bookkeeping.energy_in_ev.to_vec())
    }
    /// Thermal energy (eV) carried out by escaping particles [T] (a steady state: eV/s).
    #[getter]
    fn energy_out_ev<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.inner.bookkeeping.energy_out_ev.to_vec())
    }
    /// Thermal energy (eV) of the trapped particles [T].
    #[getter]
    fn thermal_energy_ev<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.inner.bookkeeping.thermal_energy_ev.to_vec())
    }
    /// Output times (s).
    #[getter]
    fn times_s<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.inner.times_s.clone())
    }
    /// Species in the run ("Kr", "84Kr", and the elements of fed gases).
    #[getter]
    fn species(&self) -> Vec<String> {
        self.inner.species.iter().map(|s| s.label.clone()).collect()
    }
    /// Charge-state fractions [T, Z+1] of the particles of one species present at each time.
    fn fractions<'py>(
        &self,
        py: Python<'py>,
        species: &str,
    ) -> PyResult<Bound<'py, PyArray2<f64>>> {
        Ok(matrix_to_py(py, self.history(species)?.fractions()))
    }
    /// Particles [T, Z+1] of one species in the trap (charge 0: neutral atoms in the beam).
    fn ions<'py>(&self, py: Python<'py>, species: &str) -> PyResult<Bound<'py, PyArray2<f64>>> {
        Ok(matrix_to_py(py, self.history(species)?.ions.clone()))
    }
    /// Temperatures kT (eV) [T, Z+1].
    fn temperatures_ev<'py>(
        &self,
        py: Python<'py>,
        species: &str,
    ) -> PyResult<Bound<'py, PyArray2<f64>>> {
        Ok(matrix_to_py(
            py,
            self.history(species)?.temperatures_ev.clone(),
        ))
    }
    /// Particles leaving per second over both barriers (ions/s) [T, Z+1].
    fn escape_per_s<'py>(
        &self,
        py: Python<'py>,
        species: &str,
    ) -> PyResult<Bound<'py, PyArray2<f64>>> {
        Ok(matrix_to_py(
            py,
            self.history(species)?.escape_per_s.clone(),
        ))
    }
    /// Overlap of each cloud with the beam (0…1) [T, Z+1].
    fn overlap<'py>(&self, py: Python<'py>, species: &str) -> PyResult<Bound<'py, PyArray2<f64>>> {
        Ok(matrix_to_py(py, self.history(species)?.overlap.clone()))
    }
    /// Trapped positive charge over the electrons' charge [T].
    #[getter]
    fn compensation<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.inner.compensation.to_vec())
    }
    /// Radial well depth (V) from the axis to the drift tube [T].
    #[getter]
    fn well_depth_v<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.inner.well_depth_v.to_vec())
    }
    /// Largest relative miss of the particle account (injected + fed − escaped − trapped).
    #[getter]
    fn particle_balance(&self) -> f64 {
        self.inner.bookkeeping.particle_balance
    }
    /// Largest relative miss of the energy account (initial + in − out − thermal).
    #[getter]
    fn energy_balance(&self) -> f64 {
        self.inner.bookkeeping.energy_balance
    }
    fn __repr__(&self) -> String {
        format!(
            "DynamicRun(model=dynamic, {} species, {} times, {} … {} s)",
            self.inner.species.len(),
            self.inner.times_s.len(),
            self.inner.times_s.first().copied().unwrap_or(f64::NAN),
            self.inner.times_s.last().copied().unwrap_or(f64::NAN)
        )
    }
}

/// The dynamic model's right-hand side, Jacobian and initial state for `species` in
/// `trap` (model "dynamic"), for external checks (scipy).
///
/// Parameters
/// ----------
/// trap : BeamTrap
///     A trap with ``model="dynamic"``.
/// species : str or dict of str to float
///     As for ``BeamTrap.evolve``.
///
/// Returns
/// -------
/// DynamicSystem
#[pyfunction]
fn _dynamic_system(
    trap: PyRef<'_, PyBeamTrap>,
    species: &Bound<'_, PyAny>,
) -> PyResult<PyDynamicSystem> {
    let d = trap.inner.require_dynamic()?;
    let loads = loads_arg(&trap.inner, species)?;
    let system = d.system(&trap.inner, &loads)?;
    Ok(PyDynamicSystem { system })
}

/// The ion-dynamics right-hand side as a callable (for scipy checks).
#[pyclass(name = "DynamicSystem", module = "chargecast", frozen)]
pub(crate) struct PyDynamicSystem {
    system: crate::sources::trap_dynamics::TrapSystem,
}

impl PyDynamicSystem {
    fn state(&self, y: &Bound<'_, PyAny>) -> PyResult<Vec<f64>> {
        let y = super::convert::array1_arg("y", y)?;
        if y.len() != self.system.dim() {
            return Err(Error::invalid(
                "y",
                format!("{} values", y.len()),
                &format!("give the full state ({} values)", self.system.dim()),
            )
            .into());
        }
        Ok(y)
    }
}

#[pymethods]
impl PyDynamicSystem {
    /// The initial state vector.
    #[getter]
    fn initial_state<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.system.initial_state())
    }
    /// The absolute tolerances the core uses at relative tolerance ``rtol``.
    fn atol<'py>(&self, py: Python<'py>, rtol: f64) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.system.tolerances(rtol).atol)
    }
    /// dy/dt at state ``y``.
    fn rhs<'py>(
        &self,
        py: Python<'py>,
        y: &Bound<'py, PyAny>,
    ) -> PyResult<Bound<'py, PyArray1<f64>>> {
        let y = self.state(y)?;
        let mut f = vec![0.0; y.len()];
        self.system.rhs(&y, &mut f);
        Ok(to_py(py, f))
    }
    /// The Jacobian ∂f/∂y [n, n] at state ``y`` that the core's solver uses.
    fn jacobian<'py>(
        &self,
        py: Python<'py>,
        y: &Bound<'py, PyAny>,
    ) -> PyResult<Bound<'py, PyArray2<f64>>> {
        let y = self.state(y)?;
        let n = y.len();
        let scale = self.system.tolerances(DEFAULT_RTOL).atol;
        let mut jac = ndarray::Array2::zeros((n, n));
        self.system.jacobian(&y, &scale, &mut jac);
        Ok(matrix_to_py(py, jac))
    }
    /// Populations of one species (its N entries) in a state vector.
    fn populations<'py>(
        &self,
        py: Python<'py>,
        y: &Bound<'py, PyAny>,
        species: usize,
    ) -> PyResult<Bound<'py, PyArray1<f64>>> {
        let y = super::convert::array1_arg("y", y)?;
        let sp = self
            .system
            .species
            .get(species)
            .ok_or_else(|| Error::invalid("species", species, "index out of range"))?;
        let out = (0..=sp.z)
            .map(|q| {
                y.get(self.system.n_index(species, q))
                    .copied()
                    .unwrap_or(f64::NAN)
            })
            .collect();
        Ok(to_py(py, out))
    }
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<PyDynamicRun>()?;
    m.add_class::<PyDynamicSystem>()?;
    m.add_function(wrap_pyfunction!(_dynamic_system, m)?)?;
    Ok(())
}

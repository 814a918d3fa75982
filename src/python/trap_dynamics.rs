//! Bindings of the beam trap's ion-dynamics model: the run (particles, temperatures, escape
//! fluxes, overlaps per species; compensation and well depth; the bookkeeping) and the
//! right-hand side itself, for checks against scipy.

use numpy::{PyArray1, PyArray2};
use pyo3::prelude::*;
use pyo3::types::PyDict;

use super::beam_trap::PyBeamTrap;
use super::convert::{float_dict_arg, times_arg};
use super::{guard, matrix_to_py, to_py};
use crate::error::Error;
use crate::solve::stiff::StiffSystem;
use crate::sources::trap_dynamics::{
    DynamicRun, DynamicsSwitches, TrapDynamics, DEFAULT_AXIAL_BARRIER_V,
    DEFAULT_DRIFT_TUBE_RADIUS_M, DEFAULT_RTOL,
};

fn switches(processes: Option<&Bound<'_, PyAny>>) -> PyResult<DynamicsSwitches> {
    let mut sw = DynamicsSwitches::default();
    let Some(p) = processes else {
        return Ok(sw);
    };
    let d = p.cast::<PyDict>().map_err(|_| {
        Error::invalid(
            "dynamics",
            super::convert::type_name(p),
            "must be a dict such as {\"heating\": False}",
        )
    })?;
    for (k, v) in d.iter() {
        let key: String = k.extract()?;
        let on: bool = v.extract().map_err(|_| {
            Error::invalid(
                &format!("dynamics[{key:?}]"),
                v.to_string(),
                "must be True or False",
            )
        })?;
        match key.as_str() {
            "overlap" => sw.overlap = on,
            "heating" => sw.heating = on,
            "exchange" => sw.exchange = on,
            "escape" => sw.escape = on,
            "ionization_heating" => sw.ionization_heating = on,
            "space_charge" => sw.space_charge = on,
            other => {
                return Err(Error::invalid(
                    "dynamics",
                    format!("{other:?}"),
                    "keys are overlap, heating, exchange, escape, ionization_heating, space_charge",
                )
                .into())
            }
        }
    }
    Ok(sw)
}

/// The settings of one dynamic run, validated by the core.
#[allow(clippy::too_many_arguments)]
fn dynamics(
    trap: &PyBeamTrap,
    axial_barrier_v: f64,
    drift_tube_radius_m: f64,
    gas_feed_pa: Option<&Bound<'_, PyAny>>,
    processes: Option<&Bound<'_, PyAny>>,
    rtol: f64,
) -> PyResult<TrapDynamics> {
    let mut d = TrapDynamics::new(
        &trap.inner,
        axial_barrier_v,
        drift_tube_radius_m,
        &float_dict_arg(
            "gas_feed_pa",
            gas_feed_pa,
            "must be a dict {formula: pressure_pa}",
        )?,
    )?;
    d.switches = switches(processes)?;
    if !(rtol.is_finite() && (1e-14..=1e-2).contains(&rtol)) {
        return Err(Error::invalid("rtol", rtol, "must lie in 1e-14 … 1e-2").into());
    }
    d.rtol = rtol;
    Ok(d)
}

/// The result of a dynamic evolution in a beam trap.
#[pyclass(name = "DynamicRun", module = "chargecast", frozen)]
pub(crate) struct PyDynamicRun {
    inner: DynamicRun,
}

impl PyDynamicRun {
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
            "DynamicRun({} species, {} times, {} … {} s)",
            self.inner.species.len(),
            self.inner.times_s.len(),
            self.inner.times_s.first().copied().unwrap_or(f64::NAN),
            self.inner.times_s.last().copied().unwrap_or(f64::NAN)
        )
    }
}

/// Evolve species in a beam trap with the ion-dynamics model.
///
/// Parameters
/// ----------
/// trap : BeamTrap
/// species : dict of str to float
///     Atoms injected into the beam at t = 0 per species (element or isotope).
/// times_s : array_like
///     Output times (s), ascending.
/// axial_barrier_v : float, optional
///     Axial barrier (V).
/// drift_tube_radius_m : float, optional
///     Drift-tube radius (m), larger than the beam radius.
/// gas_feed_pa : dict of str to float, optional
///     Neutral gases fed continuously, partial pressure (Pa) by formula.
/// dynamics : dict of str to bool, optional
///     Switch processes: overlap, heating, exchange, escape, ionization_heating, space_charge.
/// rtol : float, optional
///     Relative tolerance of the stiff solve.
///
/// Returns
/// -------
/// DynamicRun
#[pyfunction]
#[pyo3(signature = (trap, species, times_s, *, axial_barrier_v=DEFAULT_AXIAL_BARRIER_V,
                    drift_tube_radius_m=DEFAULT_DRIFT_TUBE_RADIUS_M, gas_feed_pa=None, dynamics=None,
                    rtol=DEFAULT_RTOL))]
#[allow(clippy::too_many_arguments)]
fn _evolve_dynamic(
    py: Python<'_>,
    trap: PyRef<'_, PyBeamTrap>,
    species: &Bound<'_, PyAny>,
    times_s: &Bound<'_, PyAny>,
    axial_barrier_v: f64,
    drift_tube_radius_m: f64,
    gas_feed_pa: Option<&Bound<'_, PyAny>>,
    dynamics: Option<&Bound<'_, PyAny>>,
    rtol: f64,
) -> PyResult<PyDynamicRun> {
    let d = self::dynamics(
        &trap,
        axial_barrier_v,
        drift_tube_radius_m,
        gas_feed_pa,
        dynamics,
        rtol,
    )?;
    let loads = float_dict_arg("species", Some(species), "must be a dict {species: atoms}")?;
    let times = times_arg(times_s)?;
    let core = trap.inner.clone();
    let inner = guard(py, || d.evolve(&core, &loads, &times))?;
    Ok(PyDynamicRun { inner })
}

/// The model's right-hand side and initial state, for external checks: returns
/// ``(y0, rhs)`` where ``rhs(y)`` is dy/dt of the state vector (same keywords as
/// ``_evolve_dynamic``).
#[pyfunction]
#[pyo3(signature = (trap, species, *, axial_barrier_v=DEFAULT_AXIAL_BARRIER_V,
                    drift_tube_radius_m=DEFAULT_DRIFT_TUBE_RADIUS_M, gas_feed_pa=None, dynamics=None))]
fn _dynamic_system(
    trap: PyRef<'_, PyBeamTrap>,
    species: &Bound<'_, PyAny>,
    axial_barrier_v: f64,
    drift_tube_radius_m: f64,
    gas_feed_pa: Option<&Bound<'_, PyAny>>,
    dynamics: Option<&Bound<'_, PyAny>>,
) -> PyResult<PyDynamicSystem> {
    let d = self::dynamics(
        &trap,
        axial_barrier_v,
        drift_tube_radius_m,
        gas_feed_pa,
        dynamics,
        DEFAULT_RTOL,
    )?;
    let loads = float_dict_arg("species", Some(species), "must be a dict {species: atoms}")?;
    let system = d.system(&trap.inner, &loads)?;
    Ok(PyDynamicSystem { system })
}

/// The ion-dynamics right-hand side as a callable (for scipy checks).
#[pyclass(name = "DynamicSystem", module = "chargecast", frozen)]
pub(crate) struct PyDynamicSystem {
    system: crate::sources::trap_dynamics::TrapSystem,
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
        let y = super::convert::array1_arg("y", y)?;
        if y.len() != self.system.dim() {
            return Err(Error::invalid(
                "y",
                format!("{} values", y.len()),
                &format!("give the full state ({} values)", self.system.dim()),
            )
            .into());
        }
        let mut f = vec![0.0; y.len()];
        self.system.rhs(&y, &mut f);
        Ok(to_py(py, f))
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
    m.add_function(wrap_pyfunction!(_evolve_dynamic, m)?)?;
    m.add_function(wrap_pyfunction!(_dynamic_system, m)?)?;
    Ok(())
}

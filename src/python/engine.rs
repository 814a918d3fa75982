//! Bindings of the engine: electron beam, beam trap, general rate equations and sweeps.

use numpy::{IntoPyArray, PyArray1, PyArray2, PyArray3, PyReadonlyArray1, PyReadonlyArray2};
use pyo3::prelude::*;
use pyo3::types::PyDict;
use rayon::prelude::*;

use super::convert::{charges_arg, energy_map_to_py, float_arg, matrix_to_py, opt_float_arg};
use super::{element_arg, guard, to_py, vec_arg};
use crate::atoms::Element;
use crate::error::{Error, Result};
use crate::network::RateNetwork;
use crate::solve::{evolve, steady_state};
use crate::sources::beam_trap::BeamTrap;
use crate::sources::electron_beam::{
    brillouin_radius_m, effective_energy_ev, electron_speed_m_s, electrons_in_trap,
    space_charge_depression_v, ElectronBeam,
};
use crate::sources::photon_beam::PhotonBeam;

/// A uniform electron beam.
///
/// Give the electron energy (eV), the current (A) and exactly one of ``radius_m``,
/// ``current_density_a_cm2`` or ``magnetic_field_t`` (the beam then has its Brillouin radius;
/// with ``cathode_radius_m`` and ``cathode_temperature_k`` (K), and optionally
/// ``cathode_field_t``, its Herrmann radius enclosing 80 % of the current).
///
/// Examples
/// --------
/// >>> import chargecast as cc
/// >>> beam = cc.ElectronBeam(energy_ev=10000.0, current_a=0.5, radius_m=50e-6)
/// >>> round(beam.current_density_a_cm2)
/// 6366
/// >>> round(beam.speed_m_s / 299792458.0, 4)
/// 0.195
/// >>> round(beam.space_charge_depression_v(5e-3))  # volts, axis to wall
/// 785
#[pyclass(name = "ElectronBeam", module = "chargecast", frozen)]
#[derive(Clone)]
pub(crate) struct PyElectronBeam {
    pub(crate) inner: ElectronBeam,
}

#[pymethods]
impl PyElectronBeam {
    #[new]
    #[pyo3(signature = (energy_ev, current_a, *, radius_m=None, current_density_a_cm2=None, magnetic_field_t=None,
                        cathode_radius_m=None, cathode_temperature_k=None, cathode_field_t=None))]
    #[allow(clippy::too_many_arguments)]
    fn new(
        energy_ev: &Bound<'_, PyAny>,
        current_a: &Bound<'_, PyAny>,
        radius_m: Option<&Bound<'_, PyAny>>,
        current_density_a_cm2: Option<&Bound<'_, PyAny>>,
        magnetic_field_t: Option<&Bound<'_, PyAny>>,
        cathode_radius_m: Option<&Bound<'_, PyAny>>,
        cathode_temperature_k: Option<&Bound<'_, PyAny>>,
        cathode_field_t: Option<&Bound<'_, PyAny>>,
    ) -> PyResult<Self> {
        let energy_ev = float_arg("energy_ev", energy_ev)?;
        let current_a = float_arg("current_a", current_a)?;
        let radius_m = opt_float_arg("radius_m", radius_m)?;
        let current_density_a_cm2 = opt_float_arg("current_density_a_cm2", current_density_a_cm2)?;
        let magnetic_field_t = opt_float_arg("magnetic_field_t", magnetic_field_t)?;
        let cathode_radius_m = opt_float_arg("cathode_radius_m", cathode_radius_m)?;
        let cathode_temperature_k = opt_float_arg("cathode_temperature_k", cathode_temperature_k)?;
        let cathode_field_t = opt_float_arg("cathode_field_t", cathode_field_t)?.unwrap_or(0.0);
        let given = [
            radius_m.is_some(),
            current_density_a_cm2.is_some(),
            magnetic_field_t.is_some(),
        ];
        if given.iter().filter(|g| **g).count() != 1 {
            return Err(Error::invalid(
                "beam size",
                "radius_m / current_density_a_cm2 / magnetic_field_t",
                "give exactly one of radius_m, current_density_a_cm2 or magnetic_field_t",
            )
            .into());
        }
        let inner = match (radius_m, current_density_a_cm2, magnetic_field_t) {
            (Some(r), _, _) => ElectronBeam::with_radius(energy_ev, current_a, r)?,
            (_, Some(j), _) => ElectronBeam::with_current_density(energy_ev, current_a, j)?,
            (_, _, Some(b)) => match (cathode_radius_m, cathode_temperature_k) {
                (Some(rc), Some(tc)) => ElectronBeam::with_herrmann(energy_ev, current_a, b, rc, tc, cathode_field_t)?,
                (None, None) => ElectronBeam::with_magnetic_field(energy_ev, current_a, b)?,
                _ => {
                    return Err(Error::invalid(
                        "cathode",
                        "only one of cathode_radius_m / cathode_temperature_k",
                        "give both cathode_radius_m and cathode_temperature_k for the Herrmann radius, or neither",
                    )
                    .into())
                }
            },
            _ => unreachable_beam()?,
        };
        Ok(PyElectronBeam { inner })
    }
    #[getter]
    fn energy_ev(&self) -> f64 {
        self.inner.energy_ev
    }
    #[getter]
    fn current_a(&self) -> f64 {
        self.inner.current_a
    }
    #[getter]
    fn radius_m(&self) -> f64 {
        self.inner.radius_m
    }
    #[getter]
    fn current_density_a_cm2(&self) -> f64 {
        self.inner.current_density_a_cm2
    }
    #[getter]
    fn speed_m_s(&self) -> f64 {
        self.inner.speed_m_s()
    }
    #[getter]
    fn electron_flux_per_cm2_s(&self) -> f64 {
        self.inner.electron_flux_per_cm2_s()
    }
    /// Space-charge potential depression axis-to-wall (V) in a drift tube of radius (m).
    fn space_charge_depression_v(&self, drift_tube_radius_m: &Bound<'_, PyAny>) -> PyResult<f64> {
        let drift_tube_radius_m = float_arg("drift_tube_radius_m", drift_tube_radius_m)?;
        crate::error::require_positive("drift_tube_radius_m", drift_tube_radius_m)?;
        if drift_tube_radius_m < self.inner.radius_m {
            return Err(Error::invalid(
                "drift_tube_radius_m",
                drift_tube_radius_m,
                "must be >= the beam radius",
            )
            .into());
        }
        Ok(space_charge_depression_v(
            self.inner.current_a,
            self.inner.energy_ev,
            self.inner.radius_m,
            drift_tube_radius_m,
        ))
    }
    fn __repr__(&self) -> String {
        format!(
            "ElectronBeam(energy_ev={}, current_a={}, radius_m={:.4e}, current_density_a_cm2={:.4e})",
            self.inner.energy_ev, self.inner.current_a, self.inner.radius_m, self.inner.current_density_a_cm2
        )
    }
}

fn unreachable_beam() -> Result<ElectronBeam> {
    Err(Error::invalid(
        "beam size",
        "none",
        "give exactly one of radius_m, current_density_a_cm2 or magnetic_field_t",
    ))
}

/// The core trap object; the Python class `chargecast.BeamTrap` wraps it.
#[pyclass(name = "_BeamTrap", module = "chargecast", frozen)]
pub(crate) struct PyBeamTrap {
    inner: BeamTrap,
}

#[pymethods]
impl PyBeamTrap {
    #[new]
    #[pyo3(signature = (beam, length_m, residual_gas_pa, ion_temperature_ev, gas_temperature_k, compensation,
                        loss_per_s, feed_charge, feed_per_s, ionization, radiative_recombination, charge_exchange,
                        photon_beam=None, multiple_ionization=false))]
    #[allow(clippy::too_many_arguments)]
    fn new(
        beam: PyRef<'_, PyElectronBeam>,
        length_m: f64,
        residual_gas_pa: Vec<(String, f64)>,
        ion_temperature_ev: f64,
        gas_temperature_k: f64,
        compensation: f64,
        loss_per_s: Option<Vec<f64>>,
        feed_charge: Option<i64>,
        feed_per_s: f64,
        ionization: bool,
        radiative_recombination: bool,
        charge_exchange: bool,
        photon_beam: Option<(f64, f64, f64)>,
        multiple_ionization: bool,
    ) -> PyResult<Self> {
        let mut inner = BeamTrap::new(
            beam.inner.clone(),
            length_m,
            &residual_gas_pa,
            ion_temperature_ev,
        )?;
        crate::error::require_positive("gas_temperature_k", gas_temperature_k)?;
        if !(compensation.is_finite() && (0.0..=1.0).contains(&compensation)) {
            return Err(Error::invalid("compensation", compensation, "must lie in 0..=1").into());
        }
        inner.gas_temperature_k = gas_temperature_k;
        inner.compensation = compensation;
        if let Some(loss) = loss_per_s {
            for (q, l) in loss.iter().enumerate() {
                crate::error::require_non_negative(&format!("loss_per_s[{q}]"), *l)?;
            }
            inner.loss_per_s = loss;
        }
        if let Some(q) = feed_charge {
            let q = u32::try_from(q).map_err(|_| {
                Error::invalid(
                    "feed charge",
                    q,
                    "must be a charge state 0..=Z of the element",
                )
            })?;
            inner.feed = Some((q, feed_per_s));
        }
        inner.processes.ionization = ionization;
        inner.processes.multiple_ionization = multiple_ionization;
        inner.processes.radiative_recombination = radiative_recombination;
        inner.processes.charge_exchange = charge_exchange;
        if let Some((energy_ev, flux_cm2_s, bandwidth_ev)) = photon_beam {
            inner.photon_beam = Some(PhotonBeam::new(energy_ev, flux_cm2_s, bandwidth_ev)?);
        }
        Ok(PyBeamTrap { inner })
    }

    #[getter]
    fn beam(&self) -> PyElectronBeam {
        PyElectronBeam {
            inner: self.inner.beam.clone(),
        }
    }
    #[getter]
    fn electrons_in_trap(&self) -> f64 {
        self.inner.electrons_in_trap()
    }

    fn evolve<'py>(
        &self,
        py: Python<'py>,
        element: &Bound<'py, PyAny>,
        times_s: PyReadonlyArray1<'py, f64>,
        initial_charge: i64,
    ) -> PyResult<Bound<'py, PyArray2<f64>>> {
        let el = element_arg(element)?;
        el.check_charge(initial_charge, el.z())?;
        let initial_charge = initial_charge as u32;
        let times = vec_arg(&times_s);
        let out = guard(py, || self.inner.evolve(el, &times, initial_charge))?;
        Ok(matrix_to_py(py, out))
    }

    fn steady_state<'py>(
        &self,
        py: Python<'py>,
        element: &Bound<'py, PyAny>,
    ) -> PyResult<Bound<'py, PyArray1<f64>>> {
        let el = element_arg(element)?;
        Ok(to_py(py, guard(py, || self.inner.steady_state(el))?))
    }

    /// Rate matrix rates[from, to] (s⁻¹) of the element's network, and loss and feed vectors.
    fn rates<'py>(
        &self,
        py: Python<'py>,
        element: &Bound<'py, PyAny>,
    ) -> PyResult<Bound<'py, PyArray2<f64>>> {
        let el = element_arg(element)?;
        let net = self.inner.network(el)?;
        Ok(matrix_to_py(py, rate_matrix(&net)))
    }

    fn ions_per_extraction<'py>(
        &self,
        py: Python<'py>,
        fractions: PyReadonlyArray1<'py, f64>,
    ) -> PyResult<Bound<'py, PyArray1<f64>>> {
        Ok(to_py(
            py,
            self.inner.ions_per_extraction(&vec_arg(&fractions))?,
        ))
    }

    fn with_energy(&self, energy_ev: f64) -> PyResult<Self> {
        Ok(PyBeamTrap {
            inner: self.inner.with_energy(energy_ev)?,
        })
    }

    fn energy_time_map<'py>(
        &self,
        py: Python<'py>,
        element: &Bound<'py, PyAny>,
        charges: Vec<i64>,
        energies_ev: PyReadonlyArray1<'py, f64>,
        times_s: PyReadonlyArray1<'py, f64>,
    ) -> PyResult<Bound<'py, PyDict>> {
        let el = element_arg(element)?;
        let charges = charges_arg(el, &charges)?;
        let (e, t) = (vec_arg(&energies_ev), vec_arg(&times_s));
        let map = guard(py, || self.inner.energy_time_map(el, &charges, &e, &t))?;
        energy_map_to_py(py, map)
    }

    /// Evolutions of several elements over an energy grid, in parallel:
    /// {symbol: ndarray[energies, times, Z+1]}.
    fn sweep<'py>(
        &self,
        py: Python<'py>,
        elements: Vec<Bound<'py, PyAny>>,
        energies_ev: PyReadonlyArray1<'py, f64>,
        times_s: PyReadonlyArray1<'py, f64>,
    ) -> PyResult<Bound<'py, PyDict>> {
        let els: Vec<&'static Element> = elements.iter().map(element_arg).collect::<Result<_>>()?;
        let (e, t) = (vec_arg(&energies_ev), vec_arg(&times_s));
        crate::error::require_all_positive("energies_ev", &e)?;
        let jobs: Vec<(usize, f64)> = (0..els.len())
            .flat_map(|i| e.iter().map(move |x| (i, *x)))
            .collect();
        crate::limits::check_memory(
            "the sweep",
            els.iter()
                .map(|el| crate::limits::bytes_for(&[e.len(), t.len(), el.z() as usize + 1], 16))
                .fold(0, u64::saturating_add),
        )?;
        let results = guard(py, || {
            crate::interrupt::run_polled(|| {
                jobs.par_iter()
                    .map(|(i, energy)| self.inner.with_energy(*energy)?.evolve(els[*i], &t, 0))
                    .collect::<Result<Vec<_>>>()
            })
        })?;
        let d = PyDict::new(py);
        for (i, el) in els.iter().enumerate() {
            let n = el.z() as usize + 1;
            let mut cube = ndarray::Array3::<f64>::zeros((e.len(), t.len(), n));
            for (k, _) in e.iter().enumerate() {
                cube.index_axis_mut(ndarray::Axis(0), k)
                    .assign(&results[i * e.len() + k]);
            }
            let arr: Bound<'py, PyArray3<f64>> = cube.into_pyarray(py);
            d.set_item(el.symbol(), arr)?;
        }
        Ok(d)
    }
}

/// Evolutions of many independent (trap, element) cases at the same output times, in
/// parallel with the GIL released; atoms start neutral.
#[pyfunction]
fn _evolve_batch<'py>(
    py: Python<'py>,
    traps: Vec<PyRef<'py, PyBeamTrap>>,
    elements: Vec<Bound<'py, PyAny>>,
    times_s: PyReadonlyArray1<'py, f64>,
) -> PyResult<Vec<Bound<'py, PyArray2<f64>>>> {
    if traps.len() != elements.len() {
        return Err(Error::invalid(
            "cases",
            format!("{} traps and {} elements", traps.len(), elements.len()),
            "give one element per trap",
        )
        .into());
    }
    let cases: Vec<(BeamTrap, &'static Element)> = traps
        .iter()
        .zip(&elements)
        .map(|(t, e)| Ok((t.inner.clone(), element_arg(e)?)))
        .collect::<Result<_>>()?;
    let times = vec_arg(&times_s);
    crate::limits::check_memory(
        "the batch of evolutions",
        cases
            .iter()
            .map(|(_, el)| crate::limits::bytes_for(&[times.len(), el.z() as usize + 1], 8))
            .fold(0, u64::saturating_add),
    )?;
    let results = guard(py, || {
        crate::interrupt::run_polled(|| {
            cases
                .par_iter()
                .map(|(trap, el)| trap.evolve(el, &times, 0))
                .collect::<Result<Vec<_>>>()
        })
    })?;
    Ok(results.into_iter().map(|a| matrix_to_py(py, a)).collect())
}

fn rate_matrix(net: &RateNetwork) -> ndarray::Array2<f64> {
    let n = net.n_states();
    ndarray::Array2::from_shape_fn((n, n), |(i, j)| if i == j { 0.0 } else { net.rate(i, j) })
}

fn network_from(
    rates: &ndarray::ArrayView2<'_, f64>,
    loss: Option<Vec<f64>>,
    feed: Option<Vec<f64>>,
) -> Result<RateNetwork> {
    let n = rates.nrows();
    if rates.ncols() != n || n == 0 {
        return Err(Error::invalid(
            "rates_per_s",
            format!("shape {:?}", rates.shape()),
            "must be a square matrix rates[from, to] with at least one state",
        ));
    }
    let mut net = RateNetwork::new(n)?;
    for ((i, j), r) in rates.indexed_iter() {
        if i != j {
            net.add_rate(i, j, *r)?;
        }
    }
    for (name, v, set) in [("loss_per_s", loss, 0), ("feed_per_s", feed, 1)] {
        if let Some(v) = v {
            if v.len() != n {
                return Err(Error::invalid(
                    name,
                    format!("{} values", v.len()),
                    &format!("needs one value per state ({n})"),
                ));
            }
            for (q, x) in v.iter().enumerate() {
                if set == 0 {
                    net.set_loss(q, *x)?;
                } else {
                    net.set_feed(q, *x)?;
                }
            }
        }
    }
    Ok(net)
}

/// Populations of dN/dt = M N + s at each time for a general rate matrix rates[from, to] (s⁻¹).
#[pyfunction]
#[pyo3(signature = (rates_per_s, initial, times_s, loss_per_s=None, feed_per_s=None))]
fn solve_rate_equations<'py>(
    py: Python<'py>,
    rates_per_s: PyReadonlyArray2<'py, f64>,
    initial: PyReadonlyArray1<'py, f64>,
    times_s: PyReadonlyArray1<'py, f64>,
    loss_per_s: Option<PyReadonlyArray1<'py, f64>>,
    feed_per_s: Option<PyReadonlyArray1<'py, f64>>,
) -> PyResult<Bound<'py, PyArray2<f64>>> {
    let net = network_from(
        &rates_per_s.as_array(),
        loss_per_s.map(|a| vec_arg(&a)),
        feed_per_s.map(|a| vec_arg(&a)),
    )?;
    let (init, times) = (vec_arg(&initial), vec_arg(&times_s));
    Ok(matrix_to_py(py, guard(py, || evolve(&net, &init, &times))?))
}

/// Steady state of a general rate matrix rates[from, to] (s⁻¹).
#[pyfunction]
#[pyo3(signature = (rates_per_s, loss_per_s=None, feed_per_s=None))]
fn steady_state_rate_equations<'py>(
    py: Python<'py>,
    rates_per_s: PyReadonlyArray2<'py, f64>,
    loss_per_s: Option<PyReadonlyArray1<'py, f64>>,
    feed_per_s: Option<PyReadonlyArray1<'py, f64>>,
) -> PyResult<Bound<'py, PyArray1<f64>>> {
    let net = network_from(
        &rates_per_s.as_array(),
        loss_per_s.map(|a| vec_arg(&a)),
        feed_per_s.map(|a| vec_arg(&a)),
    )?;
    Ok(to_py(py, guard(py, || steady_state(&net))?))
}

#[pyfunction]
fn _electron_speed_m_s(energy_ev: f64) -> PyResult<f64> {
    crate::error::require_positive("energy_ev", energy_ev)?;
    Ok(electron_speed_m_s(energy_ev))
}

#[pyfunction]
fn _brillouin_radius_m(current_a: f64, energy_ev: f64, magnetic_field_t: f64) -> PyResult<f64> {
    crate::error::require_positive("current_a", current_a)?;
    crate::error::require_positive("energy_ev", energy_ev)?;
    crate::error::require_positive("magnetic_field_t", magnetic_field_t)?;
    Ok(brillouin_radius_m(current_a, energy_ev, magnetic_field_t))
}

#[pyfunction]
fn _herrmann_radius_m(
    current_a: f64,
    energy_ev: f64,
    magnetic_field_t: f64,
    cathode_radius_m: f64,
    cathode_temperature_k: f64,
    cathode_field_t: f64,
) -> PyResult<f64> {
    // with_herrmann validates every input before the radius is computed.
    let beam = ElectronBeam::with_herrmann(
        energy_ev,
        current_a,
        magnetic_field_t,
        cathode_radius_m,
        cathode_temperature_k,
        cathode_field_t,
    )?;
    Ok(beam.radius_m)
}

#[pyfunction]
fn _effective_energy_ev(
    tube_to_cathode_v: f64,
    current_a: f64,
    beam_radius_m: f64,
    drift_tube_radius_m: f64,
    compensation: f64,
) -> PyResult<f64> {
    Ok(effective_energy_ev(
        tube_to_cathode_v,
        current_a,
        beam_radius_m,
        drift_tube_radius_m,
        compensation,
    )?)
}

#[pyfunction]
fn _electrons_in_trap(current_a: f64, energy_ev: f64, length_m: f64) -> PyResult<f64> {
    crate::error::require_positive("current_a", current_a)?;
    crate::error::require_positive("energy_ev", energy_ev)?;
    crate::error::require_positive("length_m", length_m)?;
    Ok(electrons_in_trap(current_a, energy_ev, length_m))
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<PyElectronBeam>()?;
    m.add_class::<PyBeamTrap>()?;
    m.add_function(wrap_pyfunction!(solve_rate_equations, m)?)?;
    m.add_function(wrap_pyfunction!(_evolve_batch, m)?)?;
    m.add_function(wrap_pyfunction!(steady_state_rate_equations, m)?)?;
    m.add_function(wrap_pyfunction!(_electron_speed_m_s, m)?)?;
    m.add_function(wrap_pyfunction!(_brillouin_radius_m, m)?)?;
    m.add_function(wrap_pyfunction!(_herrmann_radius_m, m)?)?;
    m.add_function(wrap_pyfunction!(_effective_energy_ev, m)?)?;
    m.add_function(wrap_pyfunction!(_electrons_in_trap, m)?)?;
    Ok(())
}

//! Binding of the electron-beam ion trap: a pyclass holding the core `BeamTrap`, built in one
//! validated step by the core builder from keyword arguments.

use numpy::{IntoPyArray, PyArray1, PyArray2, PyArray3};
use pyo3::prelude::*;
use pyo3::types::{PyDict, PyTuple};
use rayon::prelude::*;

use super::beam::PyElectronBeam;
use super::convert::{
    array1_arg, charge_list_arg, charges_arg, float_arg, fmt_g, int_arg, times_arg, type_name,
};
use super::energy_scan::PyEnergyScan;
use super::evolution::PyEvolution;
use super::photon_beam::PyPhotonBeam;
use super::{element_arg, guard, matrix_to_py, to_py};
use crate::atoms::Element;
use crate::error::{Error, Result};
use crate::sources::beam_trap::{
    BeamTrap, Processes, TrapModel, DEFAULT_COMPENSATION, DEFAULT_GAS_TEMPERATURE_K,
    DEFAULT_ION_TEMPERATURE_EV,
};

/// An electron-beam ion trap: beam, trap length, residual gas and ion temperature.
///
/// Ionization by the beam (Lotz), radiative recombination (Kim & Pratt) and charge
/// exchange on the residual gas (Müller & Salzborn) make the rate network of each element.
///
/// Parameters
/// ----------
/// beam : ElectronBeam
///     The electron beam (energy, current, radius or current density).
/// length_m : float
///     Trap length (m).
/// residual_gas_pa : dict of str to float, optional
///     Partial pressures (Pa) of residual gases by formula, e.g. ``{"H2": 5e-9}``. Known
///     gases: H2, He, N2, O2, CO, CO2, H2O, CH4, Ne, Ar, Kr, Xe.
/// ion_temperature_ev : float, optional
///     Ion temperature kT (eV), sets the ion speed in charge-exchange collisions; 50 eV by
///     default.
/// gas_temperature_k : float, optional
///     Residual-gas temperature (K); 300 K by default.
/// compensation : float, optional
///     Fraction (0…1) of the electron space charge compensated by trapped ions; sets the
///     ions per extraction; 0.5 by default.
/// loss_per_s : array_like, optional
///     Escape rate of each charge state 0…Z (s⁻¹), for one element only.
/// feed : tuple (charge, rate_per_s), optional
///     Continuous injection of that charge state (population units per second).
/// processes : sequence of str, optional
///     Subset of ``("ionization", "radiative_recombination", "charge_exchange",
///     "multiple_ionization")``; the first three by default. ``"multiple_ionization"`` lets
///     every subshell's ionization relax by Auger cascades (q → q+1+k) and adds direct
///     double ionization (q → q+2); slower for heavy elements (the cascades are computed
///     once per ion and cached).
/// multi_electron : bool, optional
///     With ``"multiple_ionization"``: relax the vacancies with shake-off and double Auger
///     decay too (default True); False gives the one-electron cascade.
/// photon_beam : PhotonBeam, optional
///     A photon beam crossing the trapped ions: its photoionization and relaxation jumps
///     are added to the network (e.g. a synchrotron beam through the trap); fixed model only.
/// model : {"fixed", "dynamic"}, optional
///     ``"fixed"`` (default): the ions of one element sit inside the beam at
///     ``ion_temperature_ev`` (linear and fast). ``"dynamic"``: several species with their
///     own temperatures, beam heating, energy exchange, escape over the barriers, overlap
///     with the beam, gas feeds and the space-charge limit; ``evolve`` then returns a
///     ``DynamicRun``.
/// axial_barrier_v : float, optional
///     Axial barrier (V) at the trap's ends, dynamic model; 100 V by default.
/// drift_tube_radius_m : float, optional
///     Drift-tube radius (m), larger than the beam radius, dynamic model; 5 mm by default.
/// gas_feed_pa : dict of str to float, optional
///     Neutral gases injected continuously, partial pressure (Pa) by formula, e.g.
///     ``{"N2": 1e-7}`` for a light coolant; dynamic model. Their elements join the run.
/// dynamic_processes : sequence of str, optional
///     Subset of ``("overlap", "heating", "exchange", "escape", "ionization_heating",
///     "space_charge", "residual_gas_ions")``; all but ``"ionization_heating"`` by
///     default; dynamic model. ``"residual_gas_ions"``: the residual gas makes ions (its
///     molecules dissociated into atomic ions); without it, charge exchange only.
///
/// Examples
/// --------
/// >>> import numpy as np
/// >>> import chargecast as cc
/// >>> beam = cc.ElectronBeam(energy_ev=8000.0, current_a=0.3, radius_m=70e-6)
/// >>> trap = cc.BeamTrap(beam, length_m=0.6, residual_gas_pa={"H2": 5e-9}, ion_temperature_ev=50.0)
/// >>> evo = trap.evolve("Ar", times_s=np.geomspace(1e-4, 1.0, 50))
/// >>> round(float(evo.fractions[-1].sum()), 9)
/// 1.0
/// >>> int(np.argmax(evo.fractions[-1]))
/// 18
#[pyclass(name = "BeamTrap", module = "chargecast", frozen, subclass)]
pub(crate) struct PyBeamTrap {
    pub(crate) inner: BeamTrap,
}

fn processes_arg(value: Option<&Bound<'_, PyAny>>) -> PyResult<Processes> {
    let Some(value) = value.filter(|v| !v.is_none()) else {
        return Ok(Processes::default());
    };
    let wrong = || {
        Error::invalid(
            "processes",
            value
                .repr()
                .map(|r| r.to_string())
                .unwrap_or_else(|_| "?".into()),
            &format!(
                "must be a sequence of names from \"{}\"",
                Processes::NAMES.join("\", \"")
            ),
        )
    };
    if value.is_instance_of::<pyo3::types::PyString>() {
        return Err(wrong().into());
    }
    let names: Vec<String> = value.extract().map_err(|_| wrong())?;
    Ok(Processes::from_names(&names)?)
}

fn feed_arg(value: Option<&Bound<'_, PyAny>>) -> PyResult<Option<(u32, f64)>> {
    let Some(value) = value.filter(|v| !v.is_none()) else {
        return Ok(None);
    };
    let pair = value
        .cast::<PyTuple>()
        .ok()
        .filter(|t| t.len() == 2)
        .ok_or_else(|| {
            Error::invalid(
                "feed",
                type_name(value),
                "must be a tuple (charge, rate_per_s)",
            )
        })?;
    let q = int_arg("feed charge", &pair.get_item(0)?)?;
    let rate = float_arg("feed rate_per_s", &pair.get_item(1)?)?;
    let q = u32::try_from(q).map_err(|_| {
        Error::invalid(
            "feed charge",
            q,
            "must be a charge state 0..=Z of the element",
        )
    })?;
    Ok(Some((q, rate)))
}

/// The element of a fixed-model run: a symbol, name or Z, or a dict naming one element
/// (its amount is irrelevant to a linear model).
fn fixed_element_arg(value: &Bound<'_, PyAny>) -> PyResult<&'static Element> {
    let Ok(d) = value.cast::<PyDict>() else {
        return Ok(element_arg(value)?);
    };
    if d.len() != 1 {
        return Err(Error::invalid(
            "species",
            format!("{} species", d.len()),
            "the fixed model runs one element: give one, or build the trap with model=\"dynamic\" for several",
        )
        .into());
    }
    let (key, _) = d
        .iter()
        .next()
        .ok_or_else(|| Error::invalid("species", "none", "give one element"))?;
    Ok(element_arg(&key)?)
}

impl PyBeamTrap {
    fn label(&self) -> String {
        let b = &self.inner.beam;
        format!(
            "{} eV, {} A/cm², {} model",
            fmt_g(b.energy_ev, 6),
            fmt_g(b.current_density_a_cm2, 3),
            self.inner.model.name()
        )
    }

    /// An error for methods that use the fixed network only.
    fn require_fixed(&self, what: &str) -> PyResult<()> {
        if self.inner.model.dynamics().is_some() {
            return Err(Error::invalid(
                "model",
                "\"dynamic\"",
                &format!("{what} scans the fixed model's network: build the trap with model=\"fixed\" for it"),
            )
            .into());
        }
        Ok(())
    }

    /// The Evolution result of this trap for `element`.
    pub(crate) fn evolution<'py>(
        &self,
        py: Python<'py>,
        element: &'static Element,
        times: Vec<f64>,
        fractions: ndarray::Array2<f64>,
    ) -> PyResult<Bound<'py, PyAny>> {
        PyEvolution::result(py, element, times, fractions, self.label())
    }
}

#[pymethods]
impl PyBeamTrap {
    #[new]
    #[pyo3(signature = (beam, length_m, *, residual_gas_pa=None, ion_temperature_ev=DEFAULT_ION_TEMPERATURE_EV,
                        gas_temperature_k=DEFAULT_GAS_TEMPERATURE_K, compensation=DEFAULT_COMPENSATION,
                        loss_per_s=None, feed=None, processes=None, photon_beam=None,
                        model=None, axial_barrier_v=None, drift_tube_radius_m=None, gas_feed_pa=None,
                        dynamic_processes=None, multi_electron=None))]
    #[allow(clippy::too_many_arguments)]
    fn new(
        beam: &Bound<'_, PyAny>,
        length_m: &Bound<'_, PyAny>,
        residual_gas_pa: Option<&Bound<'_, PyAny>>,
        #[pyo3(from_py_with = super::convert::real::ion_temperature_ev)] ion_temperature_ev: f64,
        #[pyo3(from_py_with = super::convert::real::gas_temperature_k)] gas_temperature_k: f64,
        #[pyo3(from_py_with = super::convert::real::compensation)] compensation: f64,
        loss_per_s: Option<&Bound<'_, PyAny>>,
        feed: Option<&Bound<'_, PyAny>>,
        processes: Option<&Bound<'_, PyAny>>,
        photon_beam: Option<&Bound<'_, PyAny>>,
        model: Option<&Bound<'_, PyAny>>,
        axial_barrier_v: Option<&Bound<'_, PyAny>>,
        drift_tube_radius_m: Option<&Bound<'_, PyAny>>,
        gas_feed_pa: Option<&Bound<'_, PyAny>>,
        dynamic_processes: Option<&Bound<'_, PyAny>>,
        multi_electron: Option<&Bound<'_, PyAny>>,
    ) -> PyResult<Self> {
        let multi_electron = super::convert::flag_arg("multi_electron", multi_electron, true)?;
        let beam = beam.cast::<PyElectronBeam>().map_err(|_| {
            Error::invalid("beam", type_name(beam), "must be a chargecast.ElectronBeam")
        })?;
        let mut builder =
            BeamTrap::builder(beam.get().inner.clone(), float_arg("length_m", length_m)?)
                .residual_gas_pa(super::convert::float_dict_arg(
                    "residual_gas_pa",
                    residual_gas_pa,
                    "must be a dict {formula: pressure_pa}",
                )?)
                .ion_temperature_ev(ion_temperature_ev)
                .gas_temperature_k(gas_temperature_k)
                .compensation(compensation)
                .processes(processes_arg(processes)?);
        if let Some(loss) = loss_per_s.filter(|v| !v.is_none()) {
            builder = builder.loss_per_s(array1_arg("loss_per_s", loss)?);
        }
        if let Some((q, rate)) = feed_arg(feed)? {
            builder = builder.feed(q, rate);
        }
        if let Some(photons) = photon_beam.filter(|v| !v.is_none()) {
            let photons = photons.cast::<PyPhotonBeam>().map_err(|_| {
                Error::invalid(
                    "photon_beam",
                    type_name(photons),
                    "must be a chargecast.PhotonBeam",
                )
            })?;
            builder = builder.photon_beam(photons.get().inner);
        }
        if let Some(m) = model.filter(|v| !v.is_none()) {
            let name: String = m.extract().map_err(|_| {
                Error::invalid(
                    "model",
                    type_name(m),
                    &format!("must be one of \"{}\"", TrapModel::NAMES.join("\", \"")),
                )
            })?;
            builder = builder.model(&name);
        }
        if let Some(v) = axial_barrier_v.filter(|v| !v.is_none()) {
            builder = builder.axial_barrier_v(float_arg("axial_barrier_v", v)?);
        }
        if let Some(v) = drift_tube_radius_m.filter(|v| !v.is_none()) {
            builder = builder.drift_tube_radius_m(float_arg("drift_tube_radius_m", v)?);
        }
        if let Some(v) = gas_feed_pa.filter(|v| !v.is_none()) {
            builder = builder.gas_feed_pa(super::convert::float_dict_arg(
                "gas_feed_pa",
                Some(v),
                "must be a dict {formula: pressure_pa}",
            )?);
        }
        if let Some(sw) = super::trap_dynamics::dynamic_processes_arg(dynamic_processes)? {
            builder = builder.dynamic_processes(sw);
        }
        let mut inner = builder.build()?;
        inner.relaxation = crate::processes::relaxation::Relaxation { multi_electron };
        Ok(PyBeamTrap { inner })
    }

    /// The electron beam.
    #[getter]
    fn beam(&self) -> PyElectronBeam {
        PyElectronBeam {
            inner: self.inner.beam.clone(),
        }
    }
    /// Trap length (m).
    #[getter]
    fn length_m(&self) -> f64 {
        self.inner.length_m
    }
    /// Partial pressures (Pa) of the residual gases by formula.
    #[getter]
    fn residual_gas_pa<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyDict>> {
        let d = PyDict::new(py);
        for g in &self.inner.residual_gas {
            d.set_item(g.gas.formula, g.pressure_pa)?;
        }
        Ok(d)
    }
    /// Ion temperature kT (eV).
    #[getter]
    fn ion_temperature_ev(&self) -> f64 {
        self.inner.ion_temperature_ev
    }
    /// Residual-gas temperature (K).
    #[getter]
    fn gas_temperature_k(&self) -> f64 {
        self.inner.gas_temperature_k
    }
    /// Compensated fraction (0…1) of the electron space charge.
    #[getter]
    fn compensation(&self) -> f64 {
        self.inner.compensation
    }
    /// Energy spread (FWHM, eV) of the beam's electrons in this trap: the beam's own setting,
    /// else the space-charge width at this trap's compensation.
    #[getter]
    fn energy_spread_ev(&self) -> f64 {
        self.inner.energy_spread_ev()
    }
    /// Escape rate of each charge state (s⁻¹), or None.
    #[getter]
    fn loss_per_s<'py>(&self, py: Python<'py>) -> Option<Bound<'py, PyArray1<f64>>> {
        (!self.inner.loss_per_s.is_empty()).then(|| to_py(py, self.inner.loss_per_s.clone()))
    }
    /// Continuous injection ``(charge, rate_per_s)``, or None.
    #[getter]
    fn feed(&self) -> Option<(u32, f64)> {
        self.inner.feed
    }
    /// Whether inner-shell vacancies relax with shake-off and double Auger decay.
    #[getter]
    fn multi_electron(&self) -> bool {
        self.inner.relaxation.multi_electron
    }
    /// Names of the processes in the network.
    #[getter]
    fn processes(&self) -> Vec<&'static str> {
        self.inner.processes.names()
    }
    /// The photon beam crossing the trap, or None.
    #[getter]
    fn photon_beam(&self) -> Option<PyPhotonBeam> {
        self.inner.photon_beam.map(|inner| PyPhotonBeam { inner })
    }
    /// Electrons inside the trap, N_e = I·L/(e·v).
    #[getter]
    fn electrons_in_trap(&self) -> f64 {
        self.inner.electrons_in_trap()
    }
    /// The ion model: ``"fixed"`` or ``"dynamic"``.
    #[getter]
    fn model(&self) -> &'static str {
        self.inner.model.name()
    }
    /// Axial barrier (V) of the dynamic model, or None.
    #[getter]
    fn axial_barrier_v(&self) -> Option<f64> {
        self.inner.model.dynamics().map(|d| d.axial_barrier_v)
    }
    /// Drift-tube radius (m) of the dynamic model, or None.
    #[getter]
    fn drift_tube_radius_m(&self) -> Option<f64> {
        self.inner.model.dynamics().map(|d| d.drift_tube_radius_m)
    }
    /// Gases fed continuously, partial pressure (Pa) by formula (dynamic model), or None.
    #[getter]
    fn gas_feed_pa<'py>(&self, py: Python<'py>) -> PyResult<Option<Bound<'py, PyDict>>> {
        let Some(d) = self.inner.model.dynamics() else {
            return Ok(None);
        };
        let out = PyDict::new(py);
        for g in &d.gas_feed {
            out.set_item(g.gas.formula, g.pressure_pa)?;
        }
        Ok(Some(out))
    }
    /// Names of the dynamic processes that are on (dynamic model), or None.
    #[getter]
    fn dynamic_processes(&self) -> Option<Vec<&'static str>> {
        self.inner.model.dynamics().map(|d| d.switches.names())
    }

    /// Charge-state evolution over confinement time.
    ///
    /// Parameters
    /// ----------
    /// element : str, int or dict of str to float
    ///     Fixed model: symbol, name or Z (or a dict with one element; the amount does not
    ///     matter, the model is linear). Dynamic model: a dict {species: atoms injected at
    ///     t = 0} (elements or isotopes such as ``"84Kr"``), or one name, which loads a trace
    ///     of 1e-3 × ``electrons_in_trap`` atoms.
    /// times_s : array_like
    ///     Output times (s), ascending, ≥ 0.
    /// initial_charge : int
    ///     Charge state of the injected atoms or ions (0 = neutral atoms); fixed model only
    ///     (the dynamic model injects neutral atoms).
    /// rtol : float, optional
    ///     Relative tolerance of the dynamic model's stiff solve, 1e-14 … 1e-2 (1e-8 by
    ///     default); dynamic model only.
    ///
    /// Returns
    /// -------
    /// Evolution or DynamicRun
    ///     Fixed model: ``Evolution`` (``times_s``, ``charges``, ``fractions`` [T, Z+1],
    ///     ``peak()``, ``plot()`` …). Dynamic model: ``DynamicRun`` (``fractions(species)``,
    ///     ``ions``, ``temperatures_ev``, ``escape_per_s``, ``overlap`` [T, Z+1],
    ///     ``compensation``, ``well_depth_v`` [T], bookkeeping).
    #[pyo3(signature = (element, times_s, initial_charge=None, *, rtol=None))]
    fn evolve<'py>(
        &self,
        py: Python<'py>,
        element: &Bound<'py, PyAny>,
        times_s: &Bound<'py, PyAny>,
        initial_charge: Option<&Bound<'py, PyAny>>,
        rtol: Option<&Bound<'py, PyAny>>,
    ) -> PyResult<Bound<'py, PyAny>> {
        let rtol = rtol
            .filter(|v| !v.is_none())
            .map(|v| float_arg("rtol", v))
            .transpose()?;
        if let Some(d) = self.inner.model.dynamics() {
            if let Some(q) = initial_charge.filter(|v| !v.is_none()) {
                if int_arg("initial_charge", q)? != 0 {
                    return Err(Error::invalid(
                        "initial_charge",
                        int_arg("initial_charge", q)?,
                        "the dynamic model injects neutral atoms: leave initial_charge out",
                    )
                    .into());
                }
            }
            let loads = super::trap_dynamics::loads_arg(&self.inner, element)?;
            let times = times_arg(times_s)?;
            let mut d = d.clone();
            if let Some(r) = rtol {
                d.rtol = crate::sources::trap_dynamics::require_rtol(r)?;
            }
            let core = self.inner.clone();
            let run = guard(py, || d.evolve(&core, &loads, &times))?;
            return super::trap_dynamics::PyDynamicRun::result(py, run);
        }
        if rtol.is_some() {
            return Err(Error::invalid(
                "rtol",
                "set",
                "sets the dynamic model's solver: the fixed model is solved exactly",
            )
            .into());
        }
        let el = fixed_element_arg(element)?;
        let times = times_arg(times_s)?;
        let q = match initial_charge {
            Some(q) => int_arg("initial_charge", q)?,
            None => 0,
        };
        el.check_charge(q, el.z())?;
        let out = guard(py, || self.inner.evolve(el, &times, q as u32))?;
        self.evolution(py, el, times, out)
    }

    /// Equilibrium (long-time limit).
    ///
    /// Parameters
    /// ----------
    /// element : str, int or dict of str to float
    ///     As for ``evolve``.
    ///
    /// Returns
    /// -------
    /// ndarray, shape (Z+1,) or DynamicRun
    ///     Fixed model: the fraction of each charge state. Dynamic model: a ``DynamicRun``
    ///     with one row at ``times_s = [inf]``, found by Newton's method on the steady-state
    ///     equations started from the evolving state (``steady_method`` says whether Newton
    ///     or the long solve gave it); its bookkeeping holds rates (per second).
    fn steady_state<'py>(
        &self,
        py: Python<'py>,
        element: &Bound<'py, PyAny>,
    ) -> PyResult<Bound<'py, PyAny>> {
        if self.inner.model.dynamics().is_some() {
            let loads = super::trap_dynamics::loads_arg(&self.inner, element)?;
            let core = self.inner.clone();
            let run = guard(py, || core.steady_state_dynamic(&loads))?;
            return super::trap_dynamics::PyDynamicRun::result(py, run);
        }
        let el = fixed_element_arg(element)?;
        Ok(to_py(py, guard(py, || self.inner.steady_state(el))?).into_any())
    }

    /// The element's rate matrix ``rates[from, to]`` (s⁻¹) in this trap.
    ///
    /// Parameters
    /// ----------
    /// element : str or int
    ///     Symbol, name or Z.
    ///
    /// Returns
    /// -------
    /// ndarray, shape (Z+1, Z+1)
    fn rates<'py>(
        &self,
        py: Python<'py>,
        element: &Bound<'py, PyAny>,
    ) -> PyResult<Bound<'py, PyArray2<f64>>> {
        let el = element_arg(element)?;
        let net = guard(py, || self.inner.network(el))?;
        Ok(matrix_to_py(py, net.rate_matrix()))
    }

    /// Ions of each charge state delivered per extraction.
    ///
    /// N_q = f·N_e·F_q / Σ_{q≥1} q·F_q: ions fill the trap until their charge compensates the
    /// fraction f (``compensation``) of the N_e electrons, shared by the fractions F.
    ///
    /// Parameters
    /// ----------
    /// fractions : array_like, shape (Z+1,)
    ///     Charge-state fractions, e.g. ``evolution.at(t)``.
    ///
    /// Returns
    /// -------
    /// ndarray, shape (Z+1,)
    ///     Ions per extraction of each charge state.
    fn ions_per_extraction<'py>(
        &self,
        py: Python<'py>,
        fractions: &Bound<'py, PyAny>,
    ) -> PyResult<Bound<'py, PyArray1<f64>>> {
        let fractions = array1_arg("fractions", fractions)?;
        Ok(to_py(py, self.inner.ions_per_extraction(&fractions)?))
    }

    /// The electron energy and confinement time that maximise one charge state (or a set).
    ///
    /// Parameters
    /// ----------
    /// element : str or int
    ///     Symbol, name or Z.
    /// charge : int or sequence of int
    ///     Target charge state(s), each listed once (a repeat is refused); with several, their
    ///     summed fraction is maximised.
    /// energies_ev : array_like
    ///     Electron energies (eV) to try; current density held fixed.
    /// times_s : array_like
    ///     Confinement times (s), ascending.
    ///
    /// Returns
    /// -------
    /// EnergyScan
    ///     ``best_energy_ev``, ``best_time_s``, ``best_fraction`` and the whole map
    ///     ``fraction[energy, time]`` for plotting.
    fn best_energy<'py>(
        &self,
        py: Python<'py>,
        element: &Bound<'py, PyAny>,
        charge: &Bound<'py, PyAny>,
        energies_ev: &Bound<'py, PyAny>,
        times_s: &Bound<'py, PyAny>,
    ) -> PyResult<Bound<'py, PyAny>> {
        self.require_fixed("best_energy")?;
        let el = element_arg(element)?;
        let charges = charges_arg(el, &charge_list_arg(charge)?)?;
        let e = array1_arg("energies_ev", energies_ev)?;
        let t = times_arg(times_s)?;
        let source = crate::sources::Source::BeamTrap(self.inner.clone());
        let map = guard(py, || {
            source.energy_time_map(el, &charges, &e, &t, &mut |_, _| {})
        })?;
        PyEnergyScan::result(py, "EnergyScan", el, charges, map)
    }

    /// Evolutions of several elements at several beam energies, computed in parallel.
    ///
    /// Parameters
    /// ----------
    /// elements : sequence of str or int
    ///     Elements to run.
    /// energies_ev : array_like
    ///     Electron energies (eV).
    /// times_s : array_like
    ///     Output times (s), ascending.
    ///
    /// Returns
    /// -------
    /// dict of str to ndarray
    ///     ``{symbol: fractions[energy, time, charge]}``.
    fn sweep<'py>(
        &self,
        py: Python<'py>,
        elements: &Bound<'py, PyAny>,
        energies_ev: &Bound<'py, PyAny>,
        times_s: &Bound<'py, PyAny>,
    ) -> PyResult<Bound<'py, PyDict>> {
        self.require_fixed("sweep")?;
        let els: Vec<&'static Element> = if elements.is_instance_of::<pyo3::types::PyString>()
            || elements.is_instance_of::<pyo3::types::PyInt>()
        {
            vec![element_arg(elements)?]
        } else {
            super::convert::iter_arg("elements", elements)?
                .map(|e| Ok(element_arg(&e?)?))
                .collect::<PyResult<_>>()?
        };
        if els.is_empty() {
            return Err(crate::error::Error::invalid(
                "elements",
                "[] (empty)",
                "give at least one element",
            )
            .into());
        }
        let e = array1_arg("energies_ev", energies_ev)?;
        if e.is_empty() {
            return Err(crate::error::Error::invalid(
                "energies_ev",
                "[] (empty)",
                "give at least one energy",
            )
            .into());
        }
        let t = times_arg(times_s)?;
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

    fn __repr__(&self) -> String {
        let gas: Vec<String> = self
            .inner
            .residual_gas
            .iter()
            .map(|g| format!("'{}': {}", g.gas.formula, fmt_g(g.pressure_pa, 6)))
            .collect();
        format!(
            "BeamTrap({}, length_m={}, residual_gas_pa={{{}}})",
            PyElectronBeam {
                inner: self.inner.beam.clone()
            }
            .repr(),
            fmt_g(self.inner.length_m, 6),
            gas.join(", "),
        ) + &match self.inner.model.dynamics() {
            None => String::new(),
            Some(d) => format!(
                " [model=dynamic, axial_barrier_v={}, drift_tube_radius_m={}]",
                fmt_g(d.axial_barrier_v, 6),
                fmt_g(d.drift_tube_radius_m, 6)
            ),
        }
    }
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<PyBeamTrap>()?;
    Ok(())
}

//! Bindings of the radioactive-beam breeding cycle (`breeding_cycle`) and of the
//! residual-gas ions from partial pressures (`residual_gas_ions`).

use numpy::{PyArray1, PyArray2};
use pyo3::prelude::*;
use pyo3::types::PyDict;

use super::beam_trap::PyBeamTrap;
use super::convert::{float_arg, int_arg, times_arg, type_name};
use super::{guard, matrix_to_py, to_py};
use crate::error::Error;
use crate::sources::rib_cycle::{
    nuclide, run_cycle, BreedingCycle, CycleResult, DaughterCharge, Injection,
    DEFAULT_CAPTURE_EFFICIENCY, DEFAULT_MAX_NUCLIDES,
};

fn trap_arg(trap: &Bound<'_, PyAny>) -> PyResult<crate::sources::BeamTrap> {
    trap.cast::<PyBeamTrap>()
        .map(|t| t.get().inner.clone())
        .map_err(|_| {
            super::errors::argument_type_error(format!(
                "invalid trap: {} given, must be a BeamTrap",
                type_name(trap)
            ))
        })
}

fn count_arg(name: &str, value: &Bound<'_, PyAny>) -> PyResult<u32> {
    let v = int_arg(name, value)?;
    Ok(u32::try_from(v).map_err(|_| Error::invalid(name, v, "must be a whole number >= 0"))?)
}

/// Radioactive-beam charge breeding: 1+ ions of one nuclide injected into a trap, captured,
/// bred and extracted at a repetition rate, with decay during breeding.
#[allow(clippy::too_many_arguments)]
#[pyfunction]
#[pyo3(signature = (trap, isotope, *, repetition_rate_hz, ions_per_s=None, ions_per_bunch=None,
                    capture_efficiency=None, breeding_time_s=None,
                    injected_charge=None, daughter_charge="parent", max_nuclides=None, times_s=None))]
fn breeding_cycle<'py>(
    py: Python<'py>,
    trap: &Bound<'py, PyAny>,
    isotope: &Bound<'py, PyAny>,
    repetition_rate_hz: &Bound<'py, PyAny>,
    ions_per_s: Option<&Bound<'py, PyAny>>,
    ions_per_bunch: Option<&Bound<'py, PyAny>>,
    capture_efficiency: Option<&Bound<'py, PyAny>>,
    breeding_time_s: Option<&Bound<'py, PyAny>>,
    injected_charge: Option<&Bound<'py, PyAny>>,
    daughter_charge: &str,
    max_nuclides: Option<&Bound<'py, PyAny>>,
    times_s: Option<&Bound<'py, PyAny>>,
) -> PyResult<Bound<'py, PyAny>> {
    let trap = trap_arg(trap)?;
    let spec: String = isotope.extract().map_err(|_| {
        super::errors::argument_type_error(format!(
            "invalid isotope: {} given, must be a str such as \"97Rb\"",
            type_name(isotope)
        ))
    })?;
    let (z, a) = nuclide(&spec)?;
    let injection = match (ions_per_s, ions_per_bunch) {
        (Some(r), None) => Injection::PerSecond(float_arg("ions_per_s", r)?),
        (None, Some(n)) => Injection::PerBunch(float_arg("ions_per_bunch", n)?),
        _ => {
            return Err(Error::invalid(
                "injection",
                "ions_per_s and ions_per_bunch",
                "give exactly one of ions_per_s (a continuous 1+ beam) or ions_per_bunch",
            )
            .into())
        }
    };
    let rate = float_arg("repetition_rate_hz", repetition_rate_hz)?;
    let breeding = match breeding_time_s {
        Some(t) => float_arg("breeding_time_s", t)?,
        None => 1.0 / rate,
    };
    let cycle = BreedingCycle::new(
        z,
        a,
        injection,
        capture_efficiency
            .map(|c| float_arg("capture_efficiency", c))
            .transpose()?
            .unwrap_or(DEFAULT_CAPTURE_EFFICIENCY),
        rate,
        breeding,
        injected_charge
            .map(|q| count_arg("injected_charge", q))
            .transpose()?
            .unwrap_or(1),
        DaughterCharge::parse(daughter_charge)?,
        max_nuclides
            .map(|m| count_arg("max_nuclides", m))
            .transpose()?
            .map_or(DEFAULT_MAX_NUCLIDES, |m| m as usize),
    )?;
    let times = times_s.map(times_arg).transpose()?.unwrap_or_default();
    let result = guard(py, || run_cycle(&trap, &cycle, &times))?;
    PyBreedingCycle::result(py, result, breeding)
}

/// Ions per extraction of each residual-gas element and charge state (0…Z), from the
/// trap's partial pressures over the breeding time.
#[pyfunction]
fn residual_gas_ions<'py>(
    py: Python<'py>,
    trap: &Bound<'py, PyAny>,
    breeding_time_s: &Bound<'py, PyAny>,
) -> PyResult<Bound<'py, PyDict>> {
    let trap = trap_arg(trap)?;
    let t = float_arg("breeding_time_s", breeding_time_s)?;
    let ions = guard(py, || trap.residual_ions(t))?;
    let out = PyDict::new(py);
    for r in ions {
        out.set_item(r.symbol, to_py(py, r.per_charge))?;
    }
    Ok(out)
}

/// The result of [`breeding_cycle`]: ions per bunch and per second of every nuclide of the
/// decay chain in every charge state, and the bookkeeping of the injected ions.
#[pyclass(name = "BreedingCycle", module = "chargecast", frozen, subclass)]
pub(crate) struct PyBreedingCycle {
    result: CycleResult,
    breeding_time_s: f64,
}

impl PyBreedingCycle {
    /// The result as the Python package's class.
    pub(crate) fn result<'py>(
        py: Python<'py>,
        result: CycleResult,
        breeding_time_s: f64,
    ) -> PyResult<Bound<'py, PyAny>> {
        super::results::into_result(
            py,
            "BreedingCycle",
            PyBreedingCycle {
                result,
                breeding_time_s,
            },
        )
    }

    fn index(&self, label: &str) -> PyResult<usize> {
        self.result
            .nuclides
            .iter()
            .position(|n| n.label() == label)
            .ok_or_else(|| {
                let known: Vec<String> = self.result.nuclides.iter().map(|n| n.label()).collect();
                Error::invalid(
                    "nuclide",
                    format!("{label:?}"),
                    &format!("must be one of the chain: {}", known.join(", ")),
                )
                .into()
            })
    }
}

#[pymethods]
impl PyBreedingCycle {
    #[new]
    fn new() -> PyResult<Self> {
        super::results::staged("BreedingCycle", "chargecast.breeding_cycle")
    }
    /// Nuclides of the decay chain, the injected one first ("97Rb", "97Sr", …).
    #[getter]
    fn nuclides(&self) -> Vec<String> {
        self.result.nuclides.iter().map(|n| n.label()).collect()
    }
    /// Half-life of each nuclide (s; None for a stable one).
    #[getter]
    fn half_lives_s(&self) -> Vec<Option<f64>> {
        self.result
            .nuclides
            .iter()
            .map(|n| {
                (n.decay_rate_per_s > 0.0).then(|| std::f64::consts::LN_2 / n.decay_rate_per_s)
            })
            .collect()
    }
    /// Output times within the breeding (s); the last is the extraction.
    #[getter]
    fn times_s<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.result.times_s.clone())
    }
    #[getter]
    fn breeding_time_s(&self) -> f64 {
        self.breeding_time_s
    }
    #[getter]
    fn repetition_rate_hz(&self) -> f64 {
        self.result.repetition_rate_hz
    }
    /// The daughters' entry charge rule: ``"parent"`` (the parent's charge state) or
    /// ``"electrons_kept"`` (q + ΔZ: the parent's electrons stay).
    #[getter]
    fn daughter_charge(&self) -> &'static str {
        self.result.daughter_charge.label()
    }
    /// Ions arriving per bunch.
    #[getter]
    fn ions_per_bunch(&self) -> f64 {
        self.result.ions_per_bunch
    }
    /// Ions of the injected nuclide that decayed while waiting upstream, per bunch.
    #[getter]
    fn decayed_before_injection(&self) -> f64 {
        self.result.decayed_before_injection
    }
    /// Ions per bunch that the trap did not capture.
    #[getter]
    fn not_captured(&self) -> f64 {
        self.result.not_captured
    }
    /// Per output time: injected ions still in the trap, decayed (upstream and in the
    /// trap) and lost (not captured or escaped), per bunch; the three add up to the bunch.
    #[getter]
    fn trapped<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(
            py,
            (0..self.result.times_s.len())
                .map(|t| self.result.balance(t).0)
                .collect(),
        )
    }
    #[getter]
    fn decayed<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(
            py,
            (0..self.result.times_s.len())
                .map(|t| self.result.balance(t).1)
                .collect(),
        )
    }
    #[getter]
    fn lost<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(
            py,
            (0..self.result.times_s.len())
                .map(|t| self.result.balance(t).2)
                .collect(),
        )
    }
    /// Fraction of the injected ions that leave in each charge state 0…Z of the injected
    /// nuclide.
    #[getter]
    fn efficiency<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.result.efficiency())
    }
    /// Ions per bunch of `nuclide` in each charge state at each output time, [T, Z+1].
    fn ions<'py>(&self, py: Python<'py>, nuclide: &str) -> PyResult<Bound<'py, PyArray2<f64>>> {
        let rows = &self.result.ions[self.index(nuclide)?];
        let width = rows.first().map_or(0, |r| r.len());
        let flat: Vec<f64> = rows.iter().flatten().copied().collect();
        let m = ndarray::Array2::from_shape_vec((rows.len(), width), flat)
            .map_err(|e| Error::invalid("ions", e, "internal shape"))?;
        Ok(matrix_to_py(py, m))
    }
    /// Ions per second of `nuclide` in each charge state 0…Z at the separator.
    fn extracted_per_s<'py>(
        &self,
        py: Python<'py>,
        nuclide: &str,
    ) -> PyResult<Bound<'py, PyArray1<f64>>> {
        Ok(to_py(py, self.result.extracted_per_s(self.index(nuclide)?)))
    }
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(breeding_cycle, m)?)?;
    m.add_function(wrap_pyfunction!(residual_gas_ions, m)?)?;
    m.add_class::<PyBreedingCycle>()?;
    Ok(())
}

//! Argument conversion shared by the bindings: elements given as symbol, name or Z;
//! numpy arrays; a guard that turns any stray panic into a Python exception.

use std::panic::{catch_unwind, AssertUnwindSafe};
use std::sync::{Arc, Mutex};
use std::time::{Duration, Instant};

use numpy::{IntoPyArray, PyArray1, PyArray2, PyReadonlyArray1};
use pyo3::prelude::*;
use pyo3::types::{PyBool, PyInt, PyString};

use super::errors::ChargecastError;
use crate::atoms::{element, element_by_z, Element};
use crate::error::{Error, Result};
use crate::interrupt;

/// An element from a Python str (symbol, name or digits) or int (Z).
pub(crate) fn element_arg(value: &Bound<'_, PyAny>) -> Result<&'static Element> {
    if value.is_instance_of::<PyBool>() {
        return Err(bad_element(value));
    }
    if value.is_instance_of::<PyInt>() {
        let z: i64 = value.extract().map_err(|_| bad_element(value))?;
        return element_by_z(z);
    }
    if value.is_instance_of::<PyString>() {
        let s: String = value.extract().map_err(|_| bad_element(value))?;
        return element(&s);
    }
    Err(bad_element(value))
}

fn bad_element(value: &Bound<'_, PyAny>) -> Error {
    Error::UnknownElement {
        given: value
            .repr()
            .map(|r| r.to_string())
            .unwrap_or_else(|_| "?".into()),
        max_z: 118,
    }
}

/// How often a long call re-acquires the GIL to look for pending signals (Ctrl-C).
const SIGNAL_POLL: Duration = Duration::from_millis(100);

/// Run `f` with the GIL released and turn a panic (a bug, never expected) into a
/// `ChargecastError` instead of letting it reach Python.
///
/// While `f` runs, the core's interrupt poll hook re-acquires the GIL at most every
/// [`SIGNAL_POLL`] and runs Python's signal handlers. When one raises (KeyboardInterrupt
/// from Ctrl-C), the core's cancellation flag is set, so that the loops of `f` and of its
/// worker threads stop at their next check, and that exception is raised here.
pub(crate) fn guard<T: Send>(py: Python<'_>, f: impl FnOnce() -> Result<T> + Send) -> PyResult<T> {
    let pending: Arc<Mutex<Option<PyErr>>> = Arc::default();
    let caught = pending.clone();
    let mut last_poll = Instant::now();
    let hook = move || {
        if last_poll.elapsed() < SIGNAL_POLL {
            return false;
        }
        last_poll = Instant::now();
        match Python::attach(|py| py.check_signals()) {
            Ok(()) => false,
            Err(e) => {
                *caught.lock().unwrap_or_else(|p| p.into_inner()) = Some(e);
                true
            }
        }
    };
    let out = py.detach(|| interrupt::with_poll_hook(hook, || catch_unwind(AssertUnwindSafe(f))));
    if let Some(err) = pending.lock().unwrap_or_else(|p| p.into_inner()).take() {
        // This call set the flag; every worker has stopped by now.
        interrupt::reset();
        return Err(err);
    }
    match out {
        Ok(Ok(v)) => Ok(v),
        Ok(Err(e)) => Err(e.into()),
        Err(_) => Err(ChargecastError::new_err(
            "internal error in chargecast (please report it with the inputs that caused it)",
        )),
    }
}

/// Helpers to hand vectors and matrices back to numpy.
pub(crate) fn to_py<'py>(py: Python<'py>, v: Vec<f64>) -> Bound<'py, PyArray1<f64>> {
    v.into_pyarray(py)
}

pub(crate) fn matrix_to_py<'py>(
    py: Python<'py>,
    a: ndarray::Array2<f64>,
) -> Bound<'py, PyArray2<f64>> {
    a.into_pyarray(py)
}

pub(crate) fn vec_arg(a: &PyReadonlyArray1<'_, f64>) -> Vec<f64> {
    a.as_array().iter().copied().collect()
}

/// A whole number from Python (bool and non-integers rejected with a clear message).
pub(crate) fn int_arg(name: &str, value: &Bound<'_, PyAny>) -> Result<i64> {
    if value.is_instance_of::<PyBool>() || !value.is_instance_of::<PyInt>() {
        let shown = value
            .repr()
            .map(|r| r.to_string())
            .unwrap_or_else(|_| "?".into());
        return Err(Error::invalid(name, shown, "must be a whole number (int)"));
    }
    value
        .extract::<i64>()
        .map_err(|_| Error::invalid(name, value, "must fit in a 64-bit integer"))
}

/// A real number from Python (int or float; bool, str and others rejected clearly).
pub(crate) fn float_arg(name: &str, value: &Bound<'_, PyAny>) -> Result<f64> {
    if value.is_instance_of::<PyBool>() || value.is_instance_of::<PyString>() {
        let shown = value
            .repr()
            .map(|r| r.to_string())
            .unwrap_or_else(|_| "?".into());
        return Err(Error::invalid(name, shown, "must be a number"));
    }
    value.extract::<f64>().map_err(|_| {
        let shown = value
            .repr()
            .map(|r| r.to_string())
            .unwrap_or_else(|_| "?".into());
        Error::invalid(name, shown, "must be a number")
    })
}

/// An optional real number (None stays None).
pub(crate) fn opt_float_arg(name: &str, value: Option<&Bound<'_, PyAny>>) -> Result<Option<f64>> {
    match value {
        Some(v) if !v.is_none() => float_arg(name, v).map(Some),
        _ => Ok(None),
    }
}

/// Target charges from Python, each checked against the element (0…Z).
pub(crate) fn charges_arg(element: &Element, charges: &[i64]) -> Result<Vec<u32>> {
    charges
        .iter()
        .map(|q| element.check_charge(*q, element.z()).map(|_| *q as u32))
        .collect()
}

/// An energy × time map as a dict: `fraction` [energies, times] and the best point.
pub(crate) fn energy_map_to_py<'py>(
    py: Python<'py>,
    map: crate::sources::energy_map::EnergyTimeMap,
) -> PyResult<Bound<'py, pyo3::types::PyDict>> {
    let (rows, cols) = (map.fraction.len(), map.times_s.len());
    let flat: Vec<f64> = map.fraction.into_iter().flatten().collect();
    let arr = ndarray::Array2::from_shape_vec((rows, cols), flat)
        .map_err(|e| Error::invalid("grid", e, "internal shape error"))?;
    let d = pyo3::types::PyDict::new(py);
    d.set_item("fraction", matrix_to_py(py, arr))?;
    d.set_item("best_energy_ev", map.best_energy_ev)?;
    d.set_item("best_time_s", map.best_time_s)?;
    d.set_item("best_fraction", map.best_fraction)?;
    Ok(d)
}

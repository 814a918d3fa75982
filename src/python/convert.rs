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
    // numpy integers are whole numbers too: they convert through __index__.
    if !value.is_instance_of::<PyBool>() && !value.is_instance_of::<PyInt>() {
        if let Ok(index) = value.call_method0("__index__") {
            if index.is_instance_of::<PyInt>() {
                return int_arg(name, &index);
            }
        }
    }
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

/// Any array-like of numbers as a C-contiguous float64 numpy array (numpy does the reading).
fn float_ndarray<'py>(name: &str, value: &Bound<'py, PyAny>) -> PyResult<Bound<'py, PyAny>> {
    let py = value.py();
    let np = py.import("numpy")?;
    let kwargs = pyo3::types::PyDict::new(py);
    kwargs.set_item("dtype", "float64")?;
    np.getattr("ascontiguousarray")?
        .call((value,), Some(&kwargs))
        .map_err(|_| {
            let shown = value
                .repr()
                .map(|r| r.to_string())
                .unwrap_or_else(|_| "?".into());
            Error::invalid(name, shown, "must be an array of numbers").into()
        })
}

/// A 1-D array of numbers from any array-like (a scalar gives one value).
pub(crate) fn array1_arg(name: &str, value: &Bound<'_, PyAny>) -> PyResult<Vec<f64>> {
    let arr = float_ndarray(name, value)?;
    let flat = arr.call_method0("ravel")?;
    let a: PyReadonlyArray1<'_, f64> = flat.extract()?;
    Ok(vec_arg(&a))
}

/// A 2-D array of numbers from any array-like.
pub(crate) fn array2_arg(name: &str, value: &Bound<'_, PyAny>) -> PyResult<ndarray::Array2<f64>> {
    let arr = float_ndarray(name, value)?;
    let a: numpy::PyReadonlyArray2<'_, f64> = arr.extract().map_err(|_| {
        let shape = arr
            .getattr("shape")
            .and_then(|s| s.repr())
            .map(|r| r.to_string())
            .unwrap_or_else(|_| "?".into());
        PyErr::from(Error::invalid(
            name,
            format!("shape {shape}"),
            "must be two-dimensional",
        ))
    })?;
    Ok(a.as_array().to_owned())
}

/// A number written as Python's ``format(x, f".{sig}g")`` writes it, for labels and reprs.
pub(crate) fn fmt_g(x: f64, sig: usize) -> String {
    if !x.is_finite() {
        return if x.is_nan() {
            "nan".into()
        } else if x > 0.0 {
            "inf".into()
        } else {
            "-inf".into()
        };
    }
    if x == 0.0 {
        return "0".into();
    }
    let sig = sig.max(1);
    let e = format!("{:.*e}", sig - 1, x);
    let (mantissa, exp) = e.split_once('e').unwrap_or((&e, "0"));
    let exp: i32 = exp.parse().unwrap_or(0);
    let trim = |s: &str| -> String {
        if s.contains('.') {
            s.trim_end_matches('0').trim_end_matches('.').to_string()
        } else {
            s.to_string()
        }
    };
    if exp < -4 || exp >= sig as i32 {
        let sign = if exp < 0 { '-' } else { '+' };
        format!("{}e{}{:02}", trim(mantissa), sign, exp.abs())
    } else {
        let decimals = (sig as i32 - 1 - exp).max(0) as usize;
        trim(&format!("{:.*}", decimals, x))
    }
}

/// Output times (s) from any 1-D array-like (the core checks order and sign).
pub(crate) fn times_arg(value: &Bound<'_, PyAny>) -> PyResult<Vec<f64>> {
    let arr = float_ndarray("times_s", value)?;
    let ndim: usize = arr.getattr("ndim")?.extract()?;
    if ndim > 1 {
        let shape = arr.getattr("shape")?.repr()?.to_string();
        return Err(Error::invalid(
            "times_s",
            format!("shape {shape}"),
            "must be one-dimensional",
        )
        .into());
    }
    array1_arg("times_s", &arr)
}

/// One target charge state or a sequence of them.
pub(crate) fn charge_list_arg(value: &Bound<'_, PyAny>) -> PyResult<Vec<i64>> {
    if value.is_instance_of::<pyo3::types::PyList>()
        || value.is_instance_of::<pyo3::types::PyTuple>()
        || value.hasattr("ndim")?
    {
        value
            .try_iter()?
            .map(|q| Ok(int_arg("charge", &q?)?))
            .collect()
    } else {
        Ok(vec![int_arg("charge", value)?])
    }
}

/// A Python object's type name, for messages.
pub(crate) fn type_name(value: &Bound<'_, PyAny>) -> String {
    value
        .get_type()
        .name()
        .map(|n| n.to_string())
        .unwrap_or_else(|_| "?".into())
}

#[cfg(test)]
mod tests {
    use super::fmt_g;

    #[test]
    fn fmt_g_writes_like_python() {
        // Expected strings from CPython's format(x, "g") / format(x, ".3g").
        assert_eq!(fmt_g(8000.0, 6), "8000");
        assert_eq!(fmt_g(1e-8, 6), "1e-08");
        assert_eq!(fmt_g(6366.197723675814, 3), "6.37e+03");
        assert_eq!(fmt_g(0.5, 6), "0.5");
        assert_eq!(fmt_g(1e22, 6), "1e+22");
        assert_eq!(fmt_g(123456789.0, 6), "1.23457e+08");
        assert_eq!(fmt_g(0.0001, 6), "0.0001");
        assert_eq!(fmt_g(-2.5, 3), "-2.5");
    }
}

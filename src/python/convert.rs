//! Argument conversion shared by the bindings: elements given as symbol, name or Z;
//! numpy arrays; a guard that turns any stray panic into a Python exception.

use std::panic::{catch_unwind, AssertUnwindSafe};
use std::sync::{Arc, Mutex};
use std::time::{Duration, Instant};

use numpy::{IntoPyArray, PyArray1, PyArray2, PyReadonlyArray1};
use pyo3::prelude::*;
use pyo3::types::{PyBool, PyFloat, PyInt, PyString};

use super::errors::ChargecastError;
use crate::atoms::{element, element_by_z, Element};
use crate::error::{Error, Result};
use crate::interrupt;

/// An element from a Python str (symbol, name or digits) or int (Z).
pub(crate) fn element_arg(value: &Bound<'_, PyAny>) -> Result<&'static Element> {
    if is_bool(value) {
        return Err(bad_element(value));
    }
    if value.is_instance_of::<PyInt>() {
        let z: i64 = value.extract().map_err(|_| bad_element(value))?;
        return element_by_z(z);
    }
    // numpy integers (np.int64(18)) are atomic numbers too.
    if !value.is_instance_of::<PyString>() {
        if let Ok(z) = value.call_method0("__index__") {
            if z.is_instance_of::<PyInt>() {
                return element_arg(&z);
            }
        }
    }
    if value.is_instance_of::<PyString>() {
        let s: String = value.extract().map_err(|_| bad_element(value))?;
        return element(&s);
    }
    Err(bad_element(value))
}

fn bad_element(value: &Bound<'_, PyAny>) -> Error {
    Error::UnknownElement {
        given: shown(value),
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

/// The shape every per-ion array function shares: `element`, `charge` and one array of
/// energies or temperatures (`values`, called `name` in messages) in, `compute(element,
/// charge, values)` run with the GIL released, a numpy array out. The arguments are read in
/// that order, so the first bad one is the one named.
pub(crate) fn per_ion_array<'py>(
    py: Python<'py>,
    element: &Bound<'py, PyAny>,
    charge: &Bound<'py, PyAny>,
    (name, values): (&str, &Bound<'py, PyAny>),
    compute: impl FnOnce(&'static Element, i64, &[f64]) -> Result<Vec<f64>> + Send,
) -> PyResult<Bound<'py, PyArray1<f64>>> {
    let el = element_arg(element)?;
    let values = array1_arg(name, values)?;
    let charge = int_arg("charge", charge)?;
    let out = guard(py, || compute(el, charge, &values))?;
    Ok(to_py(py, out))
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

/// A short repr of a Python value for messages (long values are cut to a prefix).
pub(crate) fn shown(value: &Bound<'_, PyAny>) -> String {
    let r = value
        .repr()
        .map(|r| r.to_string())
        .unwrap_or_else(|_| "?".into());
    if r.chars().count() > 60 {
        let head: String = r.chars().take(60).collect();
        format!("{head}...")
    } else {
        r
    }
}

/// The `TypeError` for a value of the wrong kind, naming the parameter and what it must be.
fn wrong_type(name: &str, value: &Bound<'_, PyAny>, wanted: &str) -> PyErr {
    super::errors::argument_type_error(format!(
        "invalid {name} = {}: must be {wanted}, not {}",
        shown(value),
        type_name(value)
    ))
}

/// Whether `value` is a bool (Python's or numpy's): bools are not numbers here.
fn is_bool(value: &Bound<'_, PyAny>) -> bool {
    value.is_instance_of::<PyBool>() || type_name(value) == "bool" || type_name(value) == "bool_"
}

/// A switch from Python: True or False (Python's or numpy's bool); None or absent gives
/// `default`. Anything else is a `TypeError` naming the parameter.
pub(crate) fn flag_arg(
    name: &str,
    value: Option<&Bound<'_, PyAny>>,
    default: bool,
) -> PyResult<bool> {
    match value.filter(|v| !v.is_none()) {
        None => Ok(default),
        Some(v) if is_bool(v) => v.is_truthy(),
        Some(v) => Err(wrong_type(name, v, "True or False")),
    }
}

/// A whole number from Python: int or a numpy integer (through `__index__`). Bools and
/// non-integers give a `TypeError` naming the parameter; integers beyond 64 bits an
/// `InvalidParameterError`.
pub(crate) fn int_arg(name: &str, value: &Bound<'_, PyAny>) -> PyResult<i64> {
    if is_bool(value) {
        return Err(wrong_type(name, value, "a whole number (int)"));
    }
    let int = if value.is_instance_of::<PyInt>() {
        value.clone()
    } else {
        match value.call_method0("__index__") {
            Ok(i) if i.is_instance_of::<PyInt>() => i,
            _ => return Err(wrong_type(name, value, "a whole number (int)")),
        }
    };
    int.extract::<i64>()
        .map_err(|_| Error::invalid(name, shown(value), "must fit in a 64-bit integer").into())
}

/// A real number from Python: int, float or a numpy real scalar. Bools, strings, complex
/// numbers and other objects give a `TypeError` naming the parameter; an integer too large
/// for a float64 gives an `InvalidParameterError`. Range checks stay in the core.
pub(crate) fn float_arg(name: &str, value: &Bound<'_, PyAny>) -> PyResult<f64> {
    if is_bool(value) {
        return Err(wrong_type(name, value, "a real number (int or float)"));
    }
    if value.is_instance_of::<PyFloat>() {
        return value.extract::<f64>();
    }
    if value.is_instance_of::<PyInt>() {
        return value.extract::<f64>().map_err(|_| {
            Error::invalid(
                name,
                shown(value),
                "is too large for a 64-bit float (magnitude at most 1.8e308)",
            )
            .into()
        });
    }
    // numpy scalars (np.float32, np.int64, ...) register as numbers.Real; complex ones do not.
    let py = value.py();
    let real = py.import("numbers")?.getattr("Real")?;
    if value.is_instance(&real)? {
        if value.hasattr("__index__")? {
            let i = value.call_method0("__index__")?;
            return float_arg(name, &i);
        }
        return value
            .call_method0("__float__")
            .and_then(|f| f.extract::<f64>())
            .map_err(|_| wrong_type(name, value, "a real number (int or float)"));
    }
    Err(wrong_type(name, value, "a real number (int or float)"))
}

/// An optional real number (None stays None).
pub(crate) fn opt_float_arg(name: &str, value: Option<&Bound<'_, PyAny>>) -> PyResult<Option<f64>> {
    match value {
        Some(v) if !v.is_none() => float_arg(name, v).map(Some),
        _ => Ok(None),
    }
}

/// Target charges from Python, each checked against the element (0…Z) and each given once:
/// a charge listed twice would be counted twice in the summed fraction a scan maximises.
pub(crate) fn charges_arg(element: &Element, charges: &[i64]) -> Result<Vec<u32>> {
    let mut out: Vec<u32> = Vec::with_capacity(charges.len());
    for q in charges {
        element.check_charge(*q, element.z())?;
        let q = *q as u32;
        if out.contains(&q) {
            return Err(Error::invalid(
                "charge",
                q,
                "is given more than once; list each target charge once",
            ));
        }
        out.push(q);
    }
    Ok(out)
}

/// Any array-like of real numbers as a C-contiguous float64 numpy array of its own shape. Complex, bool,
/// object and non-numeric arrays are refused with a `TypeError` naming the parameter (numpy
/// would cast complex to real with only a warning, and read objects one by one).
fn float_ndarray<'py>(name: &str, value: &Bound<'py, PyAny>) -> PyResult<Bound<'py, PyAny>> {
    let py = value.py();
    let np = py.import("numpy")?;
    let not_numbers = || wrong_type(name, value, "an array of real numbers");
    let arr = np
        .getattr("asarray")?
        .call1((value,))
        .map_err(|_| not_numbers())?;
    let kind: String = arr.getattr("dtype")?.getattr("kind")?.extract()?;
    if !matches!(kind.as_str(), "i" | "u" | "f") {
        return Err(not_numbers());
    }
    // asarray keeps the shape (a scalar stays 0-d, unlike ascontiguousarray).
    let kwargs = pyo3::types::PyDict::new(py);
    kwargs.set_item("dtype", "float64")?;
    kwargs.set_item("order", "C")?;
    np.getattr("asarray")?
        .call((arr,), Some(&kwargs))
        .map_err(|_| not_numbers())
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

/// Output times (s) from any 1-D, non-empty array-like (the core checks order and sign).
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
    let times = array1_arg("times_s", &arr)?;
    if times.is_empty() {
        // An evolution over no times has no answer to give (and nothing to plot or read).
        return Err(
            Error::invalid("times_s", "[] (empty)", "give at least one output time").into(),
        );
    }
    Ok(times)
}

/// One target charge state or a sequence of them.
pub(crate) fn charge_list_arg(value: &Bound<'_, PyAny>) -> PyResult<Vec<i64>> {
    // A numpy array of any dimension other than 0 is a list; a numpy scalar is one charge.
    let is_array =
        value.hasattr("ndim")? && value.getattr("ndim")?.extract::<usize>().unwrap_or(0) > 0;
    if value.is_instance_of::<pyo3::types::PyList>()
        || value.is_instance_of::<pyo3::types::PyTuple>()
        || is_array
    {
        iter_arg("charge", value)?
            .map(|q| int_arg("charge", &q?))
            .collect()
    } else {
        Ok(vec![int_arg("charge", value)?])
    }
}

/// An iterator over a sequence argument; anything that cannot be iterated is an
/// `ArgumentTypeError` naming the parameter.
pub(crate) fn iter_arg<'py>(
    name: &str,
    value: &Bound<'py, PyAny>,
) -> PyResult<Bound<'py, pyo3::types::PyIterator>> {
    value.try_iter().map_err(|_| {
        super::errors::argument_type_error(format!(
            "invalid {name}: {} given, must be a sequence",
            type_name(value)
        ))
    })
}

/// `{name: number}` pairs of an optional dict argument (None or absent: none), in the
/// dict's order; `allowed` says what the parameter must be.
pub(crate) fn float_dict_arg(
    name: &str,
    value: Option<&Bound<'_, PyAny>>,
    allowed: &str,
) -> PyResult<Vec<(String, f64)>> {
    let Some(value) = value.filter(|v| !v.is_none()) else {
        return Ok(Vec::new());
    };
    let dict = value
        .cast::<pyo3::types::PyDict>()
        .map_err(|_| Error::invalid(name, type_name(value), allowed))?;
    dict.iter()
        .map(|(k, v)| {
            let key = k.str()?.to_string();
            let x = float_arg(&format!("{name}[{key:?}]"), &v)?;
            Ok((key, x))
        })
        .collect()
}

/// A Python object's type name, for messages.
pub(crate) fn type_name(value: &Bound<'_, PyAny>) -> String {
    value
        .get_type()
        .name()
        .map(|n| n.to_string())
        .unwrap_or_else(|_| "?".into())
}

/// Named real-number extractors for `#[pyo3(from_py_with = ...)]`, so that keyword
/// arguments with a numeric default follow the rules of [`float_arg`] under their own name.
macro_rules! real_args {
    ($($name:ident),* $(,)?) => {
        pub(crate) mod real {
            use pyo3::prelude::*;
            $(
                pub(crate) fn $name(value: &Bound<'_, PyAny>) -> PyResult<f64> {
                    super::float_arg(stringify!($name), value)
                }
            )*
        }
    };
}
real_args!(
    energy_spread_ev,
    bandwidth_ev,
    ion_temperature_ev,
    gas_temperature_k,
    compensation,
);

/// The Python layer's own conversions go through the same rules (one definition of each).
#[pyfunction]
fn _as_float(name: &str, value: &Bound<'_, PyAny>) -> PyResult<f64> {
    float_arg(name, value)
}

#[pyfunction]
fn _as_int(name: &str, value: &Bound<'_, PyAny>) -> PyResult<i64> {
    int_arg(name, value)
}

/// Any array-like of real numbers as a float64 array of the same shape.
#[pyfunction]
fn _as_float_array<'py>(name: &str, value: &Bound<'py, PyAny>) -> PyResult<Bound<'py, PyAny>> {
    float_ndarray(name, value)
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(_as_float, m)?)?;
    m.add_function(wrap_pyfunction!(_as_int, m)?)?;
    m.add_function(wrap_pyfunction!(_as_float_array, m)?)?;
    Ok(())
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

//! Python exception classes, one per core error variant; all derive from
//! `ChargecastError`, itself a `ValueError` (bad input is a value problem).

use pyo3::create_exception;
use pyo3::exceptions::{PyKeyboardInterrupt, PyTypeError, PyUserWarning, PyValueError};
use pyo3::prelude::*;
use pyo3::sync::PyOnceLock;
use pyo3::types::{PyDict, PyTuple, PyType};

use crate::error::Error;

create_exception!(
    chargecast,
    ChargecastError,
    PyValueError,
    "Base class of every chargecast error."
);
create_exception!(
    chargecast,
    ChargecastWarning,
    PyUserWarning,
    "A value outside what the models were made for (the run goes on); the message names the value and the range."
);
create_exception!(
    chargecast,
    UnknownElementError,
    ChargecastError,
    "The element symbol, name or Z is not known."
);
create_exception!(
    chargecast,
    ChargeOutOfRangeError,
    ChargecastError,
    "A charge state outside the allowed range."
);
create_exception!(
    chargecast,
    NoDataError,
    ChargecastError,
    "The tables hold no data for this ion or quantity."
);
create_exception!(
    chargecast,
    InvalidParameterError,
    ChargecastError,
    "A parameter that is NaN, infinite, non-positive or inconsistent."
);
create_exception!(
    chargecast,
    UnknownGasError,
    InvalidParameterError,
    "A gas that is not in the built-in gas table."
);
create_exception!(
    chargecast,
    ScenarioError,
    ChargecastError,
    "A scenario file that cannot be read or breaks the schema."
);

/// `ArgumentTypeError(InvalidParameterError, TypeError)`: an argument of the wrong kind (a
/// bool, str, complex number or object where a number is needed). It is a `TypeError`, as
/// Python code expects of a wrong type, and a `ChargecastError`, as every error of this
/// package is. Built once at import (two bases need a Python-level class).
static ARGUMENT_TYPE_ERROR: PyOnceLock<Py<PyType>> = PyOnceLock::new();

fn argument_type_error_class(py: Python<'_>) -> PyResult<&Py<PyType>> {
    ARGUMENT_TYPE_ERROR.get_or_try_init(py, || {
        let bases = PyTuple::new(
            py,
            [
                py.get_type::<InvalidParameterError>().into_any(),
                py.get_type::<PyTypeError>().into_any(),
            ],
        )?;
        let ns = PyDict::new(py);
        ns.set_item("__module__", "chargecast")?;
        ns.set_item(
            "__doc__",
            "An argument of the wrong type (bool, str, complex or object where a number is \
             needed): both a TypeError and an InvalidParameterError.",
        )?;
        let cls = py
            .get_type::<PyType>()
            .call1(("ArgumentTypeError", bases, ns))?;
        Ok(cls.cast_into::<PyType>()?.unbind())
    })
}

/// The `ArgumentTypeError` with message `msg`.
pub(crate) fn argument_type_error(msg: String) -> PyErr {
    Python::attach(|py| match argument_type_error_class(py) {
        Ok(cls) => PyErr::from_type(cls.bind(py).clone(), msg),
        Err(e) => e,
    })
}

/// The Python exception for a core error.
pub(crate) fn to_py_err(err: Error) -> PyErr {
    let msg = err.to_string();
    match err {
        Error::UnknownElement { .. } => UnknownElementError::new_err(msg),
        Error::ChargeOutOfRange { .. } => ChargeOutOfRangeError::new_err(msg),
        Error::NoData { .. } => NoDataError::new_err(msg),
        Error::InvalidParameter { .. } => InvalidParameterError::new_err(msg),
        Error::UnknownGas { .. } => UnknownGasError::new_err(msg),
        Error::InvalidScenario { .. } => ScenarioError::new_err(msg),
        // Too big a request is a bad parameter value (the message names estimate and limit).
        Error::MemoryLimit { .. } | Error::AllocationFailed { .. } => {
            InvalidParameterError::new_err(msg)
        }
        // A stop requested by Ctrl-C surfaces as Python's own KeyboardInterrupt.
        Error::Interrupted => PyKeyboardInterrupt::new_err(msg),
    }
}

/// Raise each plausibility warning as a `ChargecastWarning` (an error when the warnings
/// filter turns warnings into errors).
pub(crate) fn warn_all(py: Python<'_>, warnings: &[crate::plan::Warning]) -> PyResult<()> {
    let category = py.get_type::<ChargecastWarning>();
    for w in warnings {
        let msg = std::ffi::CString::new(w.message.clone()).unwrap_or_default();
        PyErr::warn(py, &category, &msg, 1)?;
    }
    Ok(())
}

impl From<Error> for PyErr {
    fn from(err: Error) -> PyErr {
        to_py_err(err)
    }
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    let py = m.py();
    m.add("ChargecastError", py.get_type::<ChargecastError>())?;
    m.add("ChargecastWarning", py.get_type::<ChargecastWarning>())?;
    m.add("UnknownElementError", py.get_type::<UnknownElementError>())?;
    m.add(
        "ChargeOutOfRangeError",
        py.get_type::<ChargeOutOfRangeError>(),
    )?;
    m.add("NoDataError", py.get_type::<NoDataError>())?;
    m.add(
        "InvalidParameterError",
        py.get_type::<InvalidParameterError>(),
    )?;
    m.add("UnknownGasError", py.get_type::<UnknownGasError>())?;
    m.add("ScenarioError", py.get_type::<ScenarioError>())?;
    m.add(
        "ArgumentTypeError",
        argument_type_error_class(py)?.clone_ref(py),
    )?;
    Ok(())
}

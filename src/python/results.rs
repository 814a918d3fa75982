//! Result objects cross into Python as instances of the Python package's subclasses (which
//! add plots, tables and HTML): each subclass registers itself here, and a result made in
//! Rust is handed to the subclass's constructor through a one-slot staging area.

use std::any::Any;
use std::cell::RefCell;
use std::collections::HashMap;
use std::sync::Mutex;

use pyo3::exceptions::PyTypeError;
use pyo3::prelude::*;
use pyo3::types::PyType;

thread_local! {
    // The value the next result constructor on this thread takes; the GIL is held from
    // staging to the constructor call, so nothing else runs in between.
    static STAGED: RefCell<Option<Box<dyn Any + Send>>> = const { RefCell::new(None) };
}

static CLASSES: Mutex<Option<HashMap<String, Py<PyType>>>> = Mutex::new(None);

/// `_core._register_result(name, cls)`: results named `name` are made as `cls`.
#[pyfunction]
fn _register_result(name: String, cls: Bound<'_, PyType>) -> PyResult<()> {
    let mut classes = CLASSES
        .lock()
        .map_err(|_| PyTypeError::new_err("result registry poisoned"))?;
    classes
        .get_or_insert_with(HashMap::new)
        .insert(name, cls.unbind());
    Ok(())
}

fn registered(py: Python<'_>, name: &str) -> Option<Py<PyType>> {
    let classes = CLASSES.lock().ok()?;
    classes.as_ref()?.get(name).map(|c| c.clone_ref(py))
}

/// `value` as a Python object of the class registered as `name` (the pyclass itself when
/// the Python package has not registered one).
pub(crate) fn into_result<'py, T>(
    py: Python<'py>,
    name: &str,
    value: T,
) -> PyResult<Bound<'py, PyAny>>
where
    T: pyo3::PyClass + Into<pyo3::PyClassInitializer<T>> + Send + 'static,
{
    match registered(py, name) {
        Some(cls) => {
            STAGED.with(|s| *s.borrow_mut() = Some(Box::new(value)));
            let out = cls.bind(py).call0();
            STAGED.with(|s| s.borrow_mut().take());
            out
        }
        None => Ok(Bound::new(py, value)?.into_any()),
    }
}

/// The staged value, for the constructor of a result class; a result cannot be made from
/// Python directly.
pub(crate) fn staged<T: 'static>(what: &str, made_by: &str) -> PyResult<T> {
    STAGED
        .with(|s| s.borrow_mut().take())
        .and_then(|b| (b as Box<dyn Any>).downcast::<T>().ok())
        .map(|b| *b)
        .ok_or_else(|| {
            super::errors::argument_type_error(format!(
                "{what} objects are results: get one from {made_by}"
            ))
        })
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(_register_result, m)?)?;
    Ok(())
}

//! The size model's limit, as module functions: the estimated memory (result and working
//! set) one call may use before it is refused with InvalidParameterError.

use pyo3::prelude::*;

use crate::limits;

/// Set the memory limit of one call, in bytes (default 2 GiB, at least 1 MiB).
#[pyfunction]
fn set_memory_limit_bytes(limit_bytes: u64) -> PyResult<()> {
    Ok(limits::set_memory_limit_bytes(limit_bytes)?)
}

/// The memory limit of one call, in bytes.
#[pyfunction]
fn memory_limit_bytes() -> u64 {
    limits::memory_limit_bytes()
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(set_memory_limit_bytes, m)?)?;
    m.add_function(wrap_pyfunction!(memory_limit_bytes, m)?)?;
    Ok(())
}

//! The size model's limit, as module functions: the estimated memory (result and working
//! set) one call may use before it is refused with InvalidParameterError.

use pyo3::prelude::*;

use super::convert::int_arg;
use crate::limits;

/// Set the memory limit of one call.
///
/// Every evolution, batch, sweep, energy × time map and rate network estimates the memory
/// of its result and working set first and raises InvalidParameterError, naming the
/// estimate and the limit, if it exceeds this limit. The setting is process-wide.
///
/// Parameters
/// ----------
/// limit_bytes : int
///     The new limit (bytes), at least 1 MiB (1048576); the default is 2 GiB.
///
/// Examples
/// --------
/// >>> import chargecast as cc
/// >>> old = cc.memory_limit_bytes()
/// >>> cc.set_memory_limit_bytes(8 * 1024**3)
/// >>> cc.memory_limit_bytes()
/// 8589934592
/// >>> cc.set_memory_limit_bytes(old)
#[pyfunction]
fn set_memory_limit_bytes(limit_bytes: &Bound<'_, PyAny>) -> PyResult<()> {
    // A negative count is below the minimum, which the core check reports.
    let n = int_arg("limit_bytes", limit_bytes)?;
    Ok(limits::set_memory_limit_bytes(
        u64::try_from(n).unwrap_or(0),
    )?)
}

/// The memory limit of one call (see ``set_memory_limit_bytes``).
///
/// Returns
/// -------
/// int
///     The limit (bytes) on the estimated memory of one call; 2 GiB unless changed.
///
/// Examples
/// --------
/// >>> import chargecast as cc
/// >>> cc.memory_limit_bytes()
/// 2147483648
#[pyfunction]
fn memory_limit_bytes() -> u64 {
    limits::memory_limit_bytes()
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(set_memory_limit_bytes, m)?)?;
    m.add_function(wrap_pyfunction!(memory_limit_bytes, m)?)?;
    Ok(())
}

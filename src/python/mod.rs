//! PyO3 bindings: the only place where Python types appear. Each area registers its own
//! functions and classes; every core error becomes a `chargecast.ChargecastError` subclass.

use pyo3::prelude::*;

mod atoms;
mod convert;
mod engine;
mod errors;
mod photon;
mod plan;
mod spectrum;

pub(crate) use convert::{element_arg, guard, matrix_to_py, to_py, vec_arg};

#[pymodule]
fn _core(m: &Bound<'_, PyModule>) -> PyResult<()> {
    // The version is written once, in Cargo.toml; the Python package reads it from here.
    m.add("__version__", env!("CARGO_PKG_VERSION"))?;
    errors::register(m)?;
    atoms::register(m)?;
    engine::register(m)?;
    photon::register(m)?;
    spectrum::register(m)?;
    plan::register(m)?;
    Ok(())
}

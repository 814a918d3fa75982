//! PyO3 bindings: the only place where Python types appear. Each area registers its own
//! functions and classes; every core error becomes a `chargecast.ChargecastError` subclass.

use pyo3::prelude::*;

mod atoms;
mod beam;
mod beam_trap;
mod convert;
mod electron_impact;
mod energy_scan;
mod errors;
mod evolution;
mod limits;
mod molecules;
mod photon_beam;
mod plan;
mod plan_dynamics;
mod plasma;
mod processes_indirect;
mod rate_equations;
mod results;
mod spectrum;
mod trap_dynamics;
// Radioactive-beam breeding cycle and residual-gas ions (issue 11).
mod rib_cycle;
mod uncertainty;

pub(crate) use convert::{element_arg, guard, matrix_to_py, to_py, vec_arg};

#[pymodule]
fn _core(m: &Bound<'_, PyModule>) -> PyResult<()> {
    // The version is written once, in Cargo.toml; the Python package reads it from here.
    m.add("__version__", env!("CARGO_PKG_VERSION"))?;
    errors::register(m)?;
    convert::register(m)?;
    atoms::register(m)?;
    results::register(m)?;
    beam::register(m)?;
    beam_trap::register(m)?;
    rate_equations::register(m)?;
    evolution::register(m)?;
    energy_scan::register(m)?;
    photon_beam::register(m)?;
    electron_impact::register(m)?;
    spectrum::register(m)?;
    plan::register(m)?;
    limits::register(m)?;
    trap_dynamics::register(m)?;
    rib_cycle::register(m)?;
    processes_indirect::register(m)?;
    plasma::register(m)?;
    uncertainty::register(m)?;
    molecules::register(m)?;
    plan_dynamics::register(m)?;
    Ok(())
}

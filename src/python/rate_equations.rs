//! Bindings of the general rate equations: any rate matrix solved over time or to its
//! steady state, and many (trap, element) evolutions in parallel.

use numpy::{PyArray1, PyArray2, PyReadonlyArray1, PyReadonlyArray2};
use pyo3::prelude::*;
use rayon::prelude::*;

use pyo3::types::PyTuple;

use super::beam_trap::PyBeamTrap;
use super::convert::times_arg;
use super::{element_arg, guard, matrix_to_py, to_py, vec_arg};
use crate::atoms::Element;
use crate::error::{Error, Result};
use crate::network::RateNetwork;
use crate::solve::{evolve, steady_state};
use crate::sources::beam_trap::BeamTrap;

fn network_from(
    rates: &ndarray::ArrayView2<'_, f64>,
    loss: Option<Vec<f64>>,
    feed: Option<Vec<f64>>,
) -> Result<RateNetwork> {
    let n = rates.nrows();
    if rates.ncols() != n || n == 0 {
        return Err(Error::invalid(
            "rates_per_s",
            format!("shape {:?}", rates.shape()),
            "must be a square matrix rates[from, to] with at least one state",
        ));
    }
    let mut net = RateNetwork::new(n)?;
    for ((i, j), r) in rates.indexed_iter() {
        if i != j {
            net.add_rate(i, j, *r)?;
        }
    }
    for (name, v, set) in [("loss_per_s", loss, 0), ("feed_per_s", feed, 1)] {
        if let Some(v) = v {
            if v.len() != n {
                return Err(Error::invalid(
                    name,
                    format!("{} values", v.len()),
                    &format!("needs one value per state ({n})"),
                ));
            }
            for (q, x) in v.iter().enumerate() {
                if set == 0 {
                    net.set_loss(q, *x)?;
                } else {
                    net.set_feed(q, *x)?;
                }
            }
        }
    }
    Ok(net)
}

/// Populations of dN/dt = M N + s at each time for a general rate matrix rates[from, to] (s⁻¹).
#[pyfunction]
#[pyo3(signature = (rates_per_s, initial, times_s, loss_per_s=None, feed_per_s=None))]
fn solve_rate_equations<'py>(
    py: Python<'py>,
    rates_per_s: PyReadonlyArray2<'py, f64>,
    initial: PyReadonlyArray1<'py, f64>,
    times_s: PyReadonlyArray1<'py, f64>,
    loss_per_s: Option<PyReadonlyArray1<'py, f64>>,
    feed_per_s: Option<PyReadonlyArray1<'py, f64>>,
) -> PyResult<Bound<'py, PyArray2<f64>>> {
    let net = network_from(
        &rates_per_s.as_array(),
        loss_per_s.map(|a| vec_arg(&a)),
        feed_per_s.map(|a| vec_arg(&a)),
    )?;
    let (init, times) = (vec_arg(&initial), vec_arg(&times_s));
    Ok(matrix_to_py(py, guard(py, || evolve(&net, &init, &times))?))
}

/// Steady state of a general rate matrix rates[from, to] (s⁻¹).
#[pyfunction]
#[pyo3(signature = (rates_per_s, loss_per_s=None, feed_per_s=None))]
fn steady_state_rate_equations<'py>(
    py: Python<'py>,
    rates_per_s: PyReadonlyArray2<'py, f64>,
    loss_per_s: Option<PyReadonlyArray1<'py, f64>>,
    feed_per_s: Option<PyReadonlyArray1<'py, f64>>,
) -> PyResult<Bound<'py, PyArray1<f64>>> {
    let net = network_from(
        &rates_per_s.as_array(),
        loss_per_s.map(|a| vec_arg(&a)),
        feed_per_s.map(|a| vec_arg(&a)),
    )?;
    Ok(to_py(py, guard(py, || steady_state(&net))?))
}

/// Evolve many (trap, element) cases at once, in parallel (Rust threads, GIL released).
///
/// Use it for sweeps over anything a trap holds — current, radius, length, residual gas,
/// energy — and elements; atoms start neutral.
///
/// Parameters
/// ----------
/// cases : sequence of (BeamTrap, str or int)
///     Each trap with the element to run in it.
/// times_s : array_like
///     Output times (s), ascending, ≥ 0, shared by all cases.
///
/// Returns
/// -------
/// list of Evolution
///     One per case, in order.
///
/// Examples
/// --------
/// >>> import numpy as np
/// >>> import chargecast as cc
/// >>> beams = [cc.ElectronBeam(6000.0, i, radius_m=60e-6) for i in (0.1, 0.4)]
/// >>> traps = [cc.BeamTrap(b, 0.5, residual_gas_pa={"H2": 1e-9}) for b in beams]
/// >>> evos = cc.evolve_batch([(t, "Ar") for t in traps], np.geomspace(1e-4, 0.1, 30))
/// >>> bool(evos[1].mean_charge()[10] > evos[0].mean_charge()[10])  # more current, faster breeding
/// True
#[pyfunction]
fn evolve_batch<'py>(
    py: Python<'py>,
    cases: &Bound<'py, PyAny>,
    times_s: &Bound<'py, PyAny>,
) -> PyResult<Vec<Bound<'py, PyAny>>> {
    let mut traps: Vec<Bound<'py, PyBeamTrap>> = Vec::new();
    let mut elements: Vec<&'static Element> = Vec::new();
    for case in super::convert::iter_arg("cases", cases)? {
        let case = case?;
        let pair = case
            .cast::<PyTuple>()
            .ok()
            .filter(|t| t.len() == 2)
            .and_then(|t| {
                Some((
                    t.get_item(0).ok()?.cast_into::<PyBeamTrap>().ok()?,
                    t.get_item(1).ok()?,
                ))
            })
            .ok_or_else(|| {
                let shown = case
                    .repr()
                    .map(|r| r.to_string())
                    .unwrap_or_else(|_| "?".into());
                Error::invalid(
                    "case",
                    shown,
                    "each case must be a tuple (BeamTrap, element)",
                )
            })?;
        elements.push(element_arg(&pair.1)?);
        traps.push(pair.0);
    }
    let times = times_arg(times_s)?;
    let cases: Vec<(BeamTrap, &'static Element)> = traps
        .iter()
        .zip(&elements)
        .map(|(t, e)| (t.get().inner.clone(), *e))
        .collect();
    crate::limits::check_memory(
        "the batch of evolutions",
        cases
            .iter()
            .map(|(_, el)| crate::limits::bytes_for(&[times.len(), el.z() as usize + 1], 8))
            .fold(0, u64::saturating_add),
    )?;
    let results = guard(py, || {
        crate::interrupt::run_polled(|| {
            cases
                .par_iter()
                .map(|(trap, el)| trap.evolve(el, &times, 0))
                .collect::<Result<Vec<_>>>()
        })
    })?;
    traps
        .iter()
        .zip(elements)
        .zip(results)
        .map(|((trap, el), fractions)| trap.get().evolution(py, el, times.clone(), fractions))
        .collect()
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(solve_rate_equations, m)?)?;
    m.add_function(wrap_pyfunction!(steady_state_rate_equations, m)?)?;
    m.add_function(wrap_pyfunction!(evolve_batch, m)?)?;
    Ok(())
}

//! Monte Carlo samples of a trap's evolution and many trap variants evolved at once (the
//! model evaluations of a fit): heavy work in the core with the GIL released.

use numpy::{IntoPyArray, PyArray3};
use pyo3::prelude::*;

use super::beam_trap::PyBeamTrap;
use super::convert::{element_arg, float_arg, guard, int_arg, iter_arg, times_arg};
use crate::error::Error;
use crate::solve::evolve_batch;
use crate::sources::uncertainty::{monte_carlo, UncertaintyFactors};

fn initial_charge_arg(
    element: &crate::atoms::Element,
    value: Option<&Bound<'_, PyAny>>,
) -> PyResult<u32> {
    let q = match value {
        Some(q) => int_arg("initial_charge", q)?,
        None => 0,
    };
    element.check_charge(q, element.z())?;
    Ok(q as u32)
}

/// Populations of Monte Carlo samples of a trap's evolution, [samples, T, Z+1].
///
/// Every process rate is multiplied by a lognormal factor (1-σ factors per process, one
/// correlation ρ between the charges of a process); sample ``i`` of ``seed`` is the same
/// whatever ``first_sample`` and ``samples`` split the run into.
#[pyfunction]
#[pyo3(signature = (trap, element, times_s, *, samples, seed, first_sample=None, initial_charge=None,
                    ionization_factor, recombination_factor, charge_exchange_factor, charge_correlation))]
#[allow(clippy::too_many_arguments)]
fn _monte_carlo_evolve<'py>(
    py: Python<'py>,
    trap: PyRef<'py, PyBeamTrap>,
    element: &Bound<'py, PyAny>,
    times_s: &Bound<'py, PyAny>,
    samples: &Bound<'py, PyAny>,
    seed: &Bound<'py, PyAny>,
    first_sample: Option<&Bound<'py, PyAny>>,
    initial_charge: Option<&Bound<'py, PyAny>>,
    ionization_factor: &Bound<'py, PyAny>,
    recombination_factor: &Bound<'py, PyAny>,
    charge_exchange_factor: &Bound<'py, PyAny>,
    charge_correlation: &Bound<'py, PyAny>,
) -> PyResult<Bound<'py, PyArray3<f64>>> {
    let el = element_arg(element)?;
    let times = times_arg(times_s)?;
    let q = initial_charge_arg(el, initial_charge)?;
    let count = int_arg("samples", samples)?;
    if count < 1 {
        return Err(Error::invalid("samples", count, "at least 1 Monte Carlo sample").into());
    }
    let seed = int_arg("seed", seed)?;
    if seed < 0 {
        return Err(Error::invalid("seed", seed, "a seed is an integer >= 0").into());
    }
    let first = match first_sample {
        Some(v) => int_arg("first_sample", v)?,
        None => 0,
    };
    if first < 0 {
        return Err(Error::invalid("first_sample", first, "a sample index >= 0").into());
    }
    let factors = UncertaintyFactors::new(
        float_arg("ionization_factor", ionization_factor)?,
        float_arg("recombination_factor", recombination_factor)?,
        float_arg("charge_exchange_factor", charge_exchange_factor)?,
        float_arg("charge_correlation", charge_correlation)?,
    )?;
    let inner = trap.inner.clone();
    let out = guard(py, || {
        monte_carlo(
            &inner,
            el,
            q,
            &times,
            &factors,
            seed as u64,
            first as u64,
            count as usize,
        )
    })?;
    Ok(out.into_pyarray(py))
}

/// Populations of one element in several traps, [traps, T, Z+1], in parallel.
#[pyfunction]
#[pyo3(signature = (traps, element, times_s, *, initial_charge=None))]
fn _evolve_traps<'py>(
    py: Python<'py>,
    traps: &Bound<'py, PyAny>,
    element: &Bound<'py, PyAny>,
    times_s: &Bound<'py, PyAny>,
    initial_charge: Option<&Bound<'py, PyAny>>,
) -> PyResult<Bound<'py, PyArray3<f64>>> {
    let el = element_arg(element)?;
    let times = times_arg(times_s)?;
    let q = initial_charge_arg(el, initial_charge)?;
    let mut inner = Vec::new();
    for item in iter_arg("traps", traps)? {
        let item = item?;
        let t = item.cast::<PyBeamTrap>().map_err(|_| {
            Error::invalid(
                "traps",
                super::convert::type_name(&item),
                "a sequence of BeamTrap objects",
            )
        })?;
        inner.push(t.get().inner.clone());
    }
    let out = guard(py, || {
        let problems = inner
            .iter()
            .map(|t| {
                let net = t.network(el)?;
                let mut initial = vec![0.0; net.n_states()];
                initial[q as usize] = 1.0;
                Ok((net, initial))
            })
            .collect::<crate::error::Result<Vec<_>>>()?;
        let n = el.z() as usize + 1;
        let mut out = ndarray::Array3::zeros((problems.len(), times.len(), n));
        for (mut slot, r) in out
            .axis_iter_mut(ndarray::Axis(0))
            .zip(evolve_batch(&problems, &times))
        {
            slot.assign(&r?);
        }
        Ok(out)
    })?;
    Ok(out.into_pyarray(py))
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(_monte_carlo_evolve, m)?)?;
    m.add_function(wrap_pyfunction!(_evolve_traps, m)?)?;
    Ok(())
}

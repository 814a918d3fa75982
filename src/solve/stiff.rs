//! Stiff nonlinear systems dy/dt = f(y): the ion-dynamics model of the beam trap, whose
//! rates depend on the populations and temperatures themselves.
//!
//! # Method
//! diffsol's variable-order (1–5) backward-differentiation formulas with error control
//! (relative tolerance `rtol`, absolute tolerance per component `atol`) and dense output at
//! the requested times, solving the implicit stage equations by Newton's method with a dense
//! LU (nalgebra). The Jacobian comes from the system ([`StiffSystem::jacobian`]); it is
//! computed once per Newton linearisation point and cached, since diffsol asks for it column
//! by column. The default Jacobian is a forward difference with a step scaled to each
//! component: Newton then converges a little slower, but the solution's accuracy is set by
//! the error control alone. Tested against scipy's `solve_ivp(method="Radau", rtol=1e-10)`
//! on the same right-hand side (Python tests) and against closed forms (here).

use std::cell::RefCell;

use diffsol::{NalgebraLU, NalgebraMat, OdeBuilder, OdeSolverMethod};
use ndarray::Array2;

use crate::error::{require_sorted_times, Error, Result};

/// A stiff autonomous system dy/dt = f(y).
pub trait StiffSystem {
    /// Number of components of y.
    fn dim(&self) -> usize;

    /// f(y) into `dydt`.
    fn rhs(&self, y: &[f64], dydt: &mut [f64]);

    /// ∂f/∂y at `y` into `jac` (`[dim, dim]`, row = component of f). The default is a forward
    /// difference with the step √ε·max(|y_j|, `scale[j]`).
    fn jacobian(&self, y: &[f64], scale: &[f64], jac: &mut Array2<f64>) {
        forward_difference_jacobian(self, y, scale, jac);
    }
}

/// Forward-difference Jacobian of any system (see [`StiffSystem::jacobian`]).
pub fn forward_difference_jacobian<S: StiffSystem + ?Sized>(
    system: &S,
    y: &[f64],
    scale: &[f64],
    jac: &mut Array2<f64>,
) {
    let n = system.dim();
    let mut f0 = vec![0.0; n];
    system.rhs(y, &mut f0);
    let mut yp = y.to_vec();
    let mut fp = vec![0.0; n];
    for j in 0..n {
        let h = f64::EPSILON.sqrt() * y[j].abs().max(scale[j]).max(f64::MIN_POSITIVE);
        yp[j] = y[j] + h;
        let h = yp[j] - y[j];
        system.rhs(&yp, &mut fp);
        for i in 0..n {
            jac[[i, j]] = (fp[i] - f0[i]) / h;
        }
        yp[j] = y[j];
    }
}

/// Most steps one solve may take.
const MAX_STEPS: usize = 1_000_000;

/// Work counters of the last stiff solve on this thread (for benchmarks and tuning).
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct StiffStatistics {
    pub steps: usize,
    /// Jacobian evaluations with LU factorisations.
    pub jacobians: usize,
    pub newton_iterations: usize,
}

thread_local! {
    static STATISTICS: std::cell::Cell<StiffStatistics> =
        const { std::cell::Cell::new(StiffStatistics { steps: 0, jacobians: 0, newton_iterations: 0 }) };
}

/// The work counters of the last stiff solve on this thread.
pub fn last_statistics() -> StiffStatistics {
    STATISTICS.with(|s| s.get())
}

/// Tolerances of a stiff solve.
#[derive(Clone, Debug)]
pub struct StiffTolerances {
    pub rtol: f64,
    /// One absolute tolerance per component (also the scale of the difference Jacobian).
    pub atol: Vec<f64>,
}

/// The state at each of `times_s` (rows), starting from `initial` at t = 0.
///
/// `times_s` must be finite, ≥ 0 and ascending; t = 0 returns `initial`.
pub fn integrate_stiff<S: StiffSystem>(
    system: &S,
    initial: &[f64],
    times_s: &[f64],
    tolerances: &StiffTolerances,
) -> Result<Array2<f64>> {
    integrate_stiff_within(system, initial, times_s, tolerances, MAX_STEPS)?.ok_or_else(|| {
        Error::invalid(
            "times_s",
            format!("… {}", times_s.last().copied().unwrap_or(0.0)),
            &format!("needs more than {MAX_STEPS} solver steps; check the rates"),
        )
    })
}

/// [`integrate_stiff`] with at most `max_steps` steps: `None` once they are spent (a
/// caller that searches, such as the steady state, stops there instead of running on).
pub fn integrate_stiff_within<S: StiffSystem>(
    system: &S,
    initial: &[f64],
    times_s: &[f64],
    tolerances: &StiffTolerances,
    max_steps: usize,
) -> Result<Option<Array2<f64>>> {
    let n = system.dim();
    if initial.len() != n || tolerances.atol.len() != n {
        return Err(Error::invalid(
            "initial",
            format!("{} values", initial.len()),
            &format!("give one value per component ({n})"),
        ));
    }
    require_sorted_times("times_s", times_s)?;
    crate::limits::check_memory(
        "the nonlinear solve's output",
        crate::limits::bytes_for(&[times_s.len(), n], 8),
    )?;
    let mut out = crate::limits::try_zeros("the nonlinear solve's output", times_s.len(), n)?;
    let first = times_s.iter().take_while(|t| **t == 0.0).count();
    for k in 0..first {
        out.row_mut(k).assign(&ndarray::ArrayView1::from(initial));
    }
    let later = &times_s[first..];
    if later.is_empty() {
        return Ok(Some(out));
    }
    // Jacobian cache: diffsol asks for J·v once per unit vector when it refreshes its matrix.
    // The cache also holds Jᵀ, so that J·v sums only the columns of v's non-zero entries:
    // O(n) for a unit vector instead of a row-by-row O(n²), which made each refresh O(n³)
    // (a fifth of the Kr + N₂ solve's time).
    let cache: RefCell<(Vec<f64>, Array2<f64>, Array2<f64>)> = RefCell::new((
        vec![f64::NAN; n],
        Array2::zeros((n, n)),
        Array2::zeros((n, n)),
    ));
    let scale = tolerances.atol.clone();
    let y0 = initial.to_vec();
    let mut problem = OdeBuilder::<NalgebraMat<f64>>::new()
        .rtol(tolerances.rtol)
        .atol(tolerances.atol.clone())
        .rhs_implicit(
            |x: &[f64], _p: &[f64], _t: f64, y: &mut [f64]| system.rhs(x, y),
            |x: &[f64], _p: &[f64], _t: f64, v: &[f64], y: &mut [f64]| {
                let mut c = cache.borrow_mut();
                if c.0.as_slice() != x {
                    let (at, jac, columns) = &mut *c;
                    at.copy_from_slice(x);
                    system.jacobian(x, &scale, jac);
                    columns.assign(&jac.t());
                }
                let columns = &c.2;
                y.fill(0.0);
                for (j, &vj) in v.iter().enumerate() {
                    if vj != 0.0 {
                        for (yi, a) in y.iter_mut().zip(columns.row(j)) {
                            *yi += a * vj;
                        }
                    }
                }
            },
        )
        .init(
            move |_p: &[f64], _t: f64, y: &mut [f64]| y.copy_from_slice(&y0),
            n,
        )
        .build()
        .map_err(solver_error)?;
    // diffsol stops after 5000 steps by default; tight tolerances over long times need
    // more, and the interrupt check below lets a caller stop a long solve instead.
    // One more than our own count below, which stops first.
    problem.ode_options.max_number_timesteps = max_steps.saturating_add(1);
    let mut solver = problem.bdf::<NalgebraLU<f64>>().map_err(solver_error)?;
    // Step by step (not diffsol's one-call dense solve) so that a stop request is seen
    // between steps: each step costs at most a few Jacobians, well under the 0.5 s the
    // interrupt promises for the systems the model builds.
    let final_time = later[later.len() - 1];
    solver.set_stop_time(final_time).map_err(solver_error)?;
    let mut col = 0;
    let mut steps = 0;
    while col < later.len() {
        crate::interrupt::check()?;
        steps += 1;
        if steps > max_steps {
            return Ok(None);
        }
        let reason = solver.step().map_err(solver_error)?;
        let t_now = solver.state().t;
        while col < later.len() && later[col] <= t_now {
            let y = solver.interpolate(later[col]).map_err(solver_error)?;
            for i in 0..n {
                out[[first + col, i]] = y[i];
            }
            col += 1;
        }
        if matches!(reason, diffsol::OdeSolverStopReason::TstopReached) && col < later.len() {
            break;
        }
    }
    let stats = solver.get_statistics();
    STATISTICS.with(|s| {
        s.set(StiffStatistics {
            steps: stats.number_of_steps,
            jacobians: stats.number_of_linear_solver_setups,
            newton_iterations: stats.number_of_nonlinear_solver_iterations,
        })
    });
    if out.iter().any(|v| !v.is_finite()) || col != later.len() {
        return Err(Error::invalid(
            "times_s",
            format!("… {}", later[later.len() - 1]),
            "the nonlinear solve did not reach every output time with finite values",
        ));
    }
    Ok(Some(out))
}

fn solver_error(e: diffsol::DiffsolError) -> Error {
    Error::invalid(
        "stiff solve",
        "failed",
        &format!("the BDF solver gave up ({e}); check that the rates are finite"),
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Robertson's chemical kinetics (H. H. Robertson 1966), the classic stiff test.
    struct Robertson;
    impl StiffSystem for Robertson {
        fn dim(&self) -> usize {
            3
        }
        fn rhs(&self, y: &[f64], f: &mut [f64]) {
            f[0] = -0.04 * y[0] + 1e4 * y[1] * y[2];
            f[1] = 0.04 * y[0] - 1e4 * y[1] * y[2] - 3e7 * y[1] * y[1];
            f[2] = 3e7 * y[1] * y[1];
        }
    }

    /// dy/dt = −k y with k spread over decades: closed form e^{−kt}.
    struct Decay(Vec<f64>);
    impl StiffSystem for Decay {
        fn dim(&self) -> usize {
            self.0.len()
        }
        fn rhs(&self, y: &[f64], f: &mut [f64]) {
            for ((fi, yi), k) in f.iter_mut().zip(y).zip(&self.0) {
                *fi = -k * yi;
            }
        }
    }

    #[test]
    fn robertson_conserves_mass_and_matches_reference() {
        let tol = StiffTolerances {
            rtol: 1e-10,
            atol: vec![1e-14, 1e-16, 1e-14],
        };
        let times = [0.0, 0.4, 40.0, 4e4];
        let y = integrate_stiff(&Robertson, &[1.0, 0.0, 0.0], &times, &tol).unwrap();
        for k in 0..times.len() {
            let total: f64 = y.row(k).sum();
            assert!((total - 1.0).abs() < 1e-9, "{total}");
        }
        // Reference values at t = 40 from scipy solve_ivp(Radau, rtol=1e-12, atol=1e-16)
        // (computed while writing this test): 0.71582706872, 9.1855347646e-6, 0.28416374575.
        assert!((y[[2, 0]] - 0.715_827_068_72).abs() < 1e-7, "{}", y[[2, 0]]);
        assert!(
            (y[[2, 1]] / 9.185_534_764_6e-6 - 1.0).abs() < 1e-5,
            "{}",
            y[[2, 1]]
        );
        assert_eq!(y[[0, 0]], 1.0);
    }

    #[test]
    fn stiff_decay_matches_exponentials() {
        let k = vec![1e-2, 1.0, 1e3, 1e6];
        let tol = StiffTolerances {
            rtol: 1e-10,
            atol: vec![1e-16; 4],
        };
        let times = [1e-7, 1e-3, 0.5, 3.0];
        let y = integrate_stiff(&Decay(k.clone()), &[1.0; 4], &times, &tol).unwrap();
        for (r, t) in times.iter().enumerate() {
            for (i, ki) in k.iter().enumerate() {
                let exact = (-ki * t).exp();
                assert!((y[[r, i]] - exact).abs() < 1e-8 + 1e-7 * exact, "{t} {ki}");
            }
        }
    }
}

//! Special functions the closed-form rate coefficients need.

/// Euler–Mascheroni constant γ.
pub const EULER_GAMMA: f64 = 0.577_215_664_901_532_9;

/// Below this argument the power series is used, above it the continued fraction.
const SERIES_LIMIT: f64 = 1.0;
const MAX_TERMS: usize = 500;

/// Exponential integral E₁(x) = ∫₁^∞ e^(−xt)/t dt for x > 0.
///
/// Power series E₁(x) = −γ − ln x − Σ_{k≥1} (−x)^k / (k·k!) for x < 1, and the continued
/// fraction E₁(x) = e^(−x) / (x + 1 − 1²/(x + 3 − 2²/(x + 5 − …))) evaluated by the modified
/// Lentz method for x ≥ 1 (Abramowitz & Stegun 5.1.11 and 5.1.22; the algorithm as in Press
/// et al., Numerical Recipes, §6.3). Relative error below 1e-14 wherever the result is a
/// normal float (x up to about 700; beyond it the result underflows towards 0).
///
/// Returns +∞ at x = 0 and NaN for negative or NaN arguments.
pub fn exp1(x: f64) -> f64 {
    if x.is_nan() || x < 0.0 {
        f64::NAN
    } else if x == 0.0 {
        f64::INFINITY
    } else if x < SERIES_LIMIT {
        exp1_series(x)
    } else if x.is_infinite() {
        0.0
    } else {
        (-x).exp() * exp1_continued_fraction(x)
    }
}

/// Scaled exponential integral e^x·E₁(x), finite for large x where E₁ itself underflows.
///
/// Same domain conventions as [`exp1`]; tends to 1/x for large x.
pub fn exp1_scaled(x: f64) -> f64 {
    if x.is_nan() || x < 0.0 {
        f64::NAN
    } else if x == 0.0 {
        f64::INFINITY
    } else if x < SERIES_LIMIT {
        x.exp() * exp1_series(x)
    } else if x.is_infinite() {
        0.0
    } else {
        exp1_continued_fraction(x)
    }
}

fn exp1_series(x: f64) -> f64 {
    let mut sum = -x.ln() - EULER_GAMMA;
    let mut factor = 1.0;
    for k in 1..MAX_TERMS {
        let k = k as f64;
        factor *= -x / k;
        let term = -factor / k;
        sum += term;
        if term.abs() < sum.abs() * f64::EPSILON * 0.25 {
            break;
        }
    }
    sum
}

/// e^x·E₁(x) for x ≥ 1 by the modified Lentz method.
fn exp1_continued_fraction(x: f64) -> f64 {
    const TINY: f64 = 1e-300;
    let mut b = x + 1.0;
    let mut c = 1.0 / TINY;
    let mut d = 1.0 / b;
    let mut h = d;
    for i in 1..MAX_TERMS {
        let i = i as f64;
        let a = -i * i;
        b += 2.0;
        d = 1.0 / (a * d + b);
        c = b + a / c;
        let delta = c * d;
        h *= delta;
        if (delta - 1.0).abs() < 0.5 * f64::EPSILON {
            break;
        }
    }
    h
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Reference values from scipy.special.exp1 (scipy 1.17.1).
    const SCIPY_EXP1: [(f64, f64); 17] = [
        (1e-300, 690.1983122333121),
        (1e-10, 22.448635265138922),
        (0.001, 6.331539364136149),
        (0.1, 1.8229239584193906),
        (0.5, 0.5597735947761608),
        (0.999, 0.21975218202294444),
        (1.0, 0.2193839343955205),
        (1.001, 0.21901642252746892),
        (1.5, 0.10001958240663265),
        (2.0, 0.048900510708061125),
        (5.0, 0.0011482955912753257),
        (10.0, 4.156968929685325e-06),
        (30.0, 3.021552010688813e-15),
        (50.0, 3.783264029550459e-24),
        (100.0, 3.683597761682032e-46),
        (300.0, 1.71038427680451e-133),
        (700.0, 1.406518766234033e-307),
    ];

    #[test]
    fn exp1_matches_scipy_to_1e_14_relative() {
        for (x, want) in SCIPY_EXP1 {
            let got = exp1(x);
            let rel = (got - want).abs() / want;
            assert!(
                rel < 1e-14,
                "E1({x}) = {got:e}, scipy.special.exp1 {want:e}, rel {rel:e}"
            );
        }
    }

    #[test]
    fn scaled_form_agrees_with_unscaled_and_tends_to_one_over_x() {
        for (x, want) in SCIPY_EXP1.iter().filter(|(x, _)| *x <= 300.0) {
            let scaled = exp1_scaled(*x) * (-x).exp();
            assert!((scaled - want).abs() / want < 2e-14, "x = {x}");
        }
        // e^x E1(x) = 1/x · (1 − 1/x + 2/x² − …) (Abramowitz & Stegun 5.1.51).
        let x = 1e6;
        assert!((exp1_scaled(x) * x - (1.0 - 1.0 / x + 2.0 / (x * x))).abs() < 1e-15);
    }

    #[test]
    fn domain_edges_do_not_panic() {
        assert!(exp1(-1.0).is_nan());
        assert!(exp1(f64::NAN).is_nan());
        assert_eq!(exp1(0.0), f64::INFINITY);
        assert_eq!(exp1(f64::INFINITY), 0.0);
        assert_eq!(exp1_scaled(f64::INFINITY), 0.0);
        assert!(exp1(800.0) >= 0.0);
    }
}

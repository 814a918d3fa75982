//! Peak shapes on the m/q axis at a resolving power, and the share of a peak's area that
//! falls inside a window.
//!
//! At resolving power R every peak's full width at half maximum is FWHM = (m/q)/R. Shapes:
//! Gaussian (σ = FWHM/(2√(2 ln 2)); area in a window ½[erf(b) − erf(a)], taken from the far
//! tail for distant interferers so they keep their relative precision), triangular (base
//! 2·FWHM) and rectangular (width FWHM, an ideal slit). These are idealised instrument
//! responses (common practice), not a model of a particular separator. erf and erfc follow
//! Abramowitz & Stegun 7.1.6 and 7.1.14 and match scipy.special within 10⁻¹⁵ (erf,
//! absolute) and 10⁻¹⁴ (erfc, relative) in the tests below.

use crate::error::{require_positive, Error, Result};

/// The shape of one line's peak; its full width at half maximum is (m/q)/R.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum PeakShape {
    /// Normal distribution, σ = FWHM / (2√(2 ln 2)).
    #[default]
    Gaussian,
    /// Symmetric triangle with base FWHM·2.
    Triangular,
    /// Flat top of width FWHM (an ideal slit transmission).
    Rectangular,
}

impl PeakShape {
    /// "gaussian", "triangular" or "rectangular" (case-insensitive).
    pub fn parse(name: &str) -> Result<Self> {
        match name.trim().to_ascii_lowercase().as_str() {
            "gaussian" | "gauss" | "normal" => Ok(PeakShape::Gaussian),
            "triangular" | "triangle" => Ok(PeakShape::Triangular),
            "rectangular" | "rectangle" | "flat" => Ok(PeakShape::Rectangular),
            _ => Err(Error::invalid(
                "shape",
                format!("{name:?}"),
                "one of \"gaussian\", \"triangular\", \"rectangular\"",
            )),
        }
    }

    pub fn label(&self) -> &'static str {
        match self {
            PeakShape::Gaussian => "gaussian",
            PeakShape::Triangular => "triangular",
            PeakShape::Rectangular => "rectangular",
        }
    }

    /// Share of the area of a unit peak centred at `centre` with full width at half maximum
    /// `fwhm` that lies in [lo, hi].
    pub fn area_in(&self, centre: f64, fwhm: f64, lo: f64, hi: f64) -> f64 {
        if hi <= lo {
            return 0.0;
        }
        match self {
            PeakShape::Gaussian => {
                // ½[erf(b) − erf(a)] with b = (hi − μ)/(σ√2); taken from the tail that keeps
                // both terms small so far interferers keep their relative precision.
                let scale =
                    fwhm / (2.0 * (2.0 * std::f64::consts::LN_2).sqrt()) * std::f64::consts::SQRT_2;
                let a = (lo - centre) / scale;
                let b = (hi - centre) / scale;
                if a >= 0.0 {
                    0.5 * (erfc(a) - erfc(b))
                } else if b <= 0.0 {
                    0.5 * (erfc(-b) - erfc(-a))
                } else {
                    0.5 * (erf(b) - erf(a))
                }
            }
            PeakShape::Triangular => {
                let cdf = |x: f64| {
                    let u = ((x - centre) / fwhm).clamp(-1.0, 1.0);
                    if u <= 0.0 {
                        0.5 * (1.0 + u) * (1.0 + u)
                    } else {
                        1.0 - 0.5 * (1.0 - u) * (1.0 - u)
                    }
                };
                cdf(hi) - cdf(lo)
            }
            PeakShape::Rectangular => {
                let overlap = hi.min(centre + 0.5 * fwhm) - lo.max(centre - 0.5 * fwhm);
                (overlap / fwhm).clamp(0.0, 1.0)
            }
        }
    }

    /// Height of the peak at `x` relative to its maximum.
    pub fn height(&self, centre: f64, fwhm: f64, x: f64) -> f64 {
        let u = (x - centre) / fwhm;
        match self {
            PeakShape::Gaussian => (-4.0 * std::f64::consts::LN_2 * u * u).exp(),
            PeakShape::Triangular => (1.0 - u.abs()).max(0.0),
            PeakShape::Rectangular => {
                if u.abs() <= 0.5 {
                    1.0
                } else {
                    0.0
                }
            }
        }
    }
}

/// Peaks of one shape at a resolving power R = (m/q)/FWHM.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Peaks {
    pub resolving_power: f64,
    pub shape: PeakShape,
}

impl Peaks {
    pub fn new(resolving_power: f64, shape: PeakShape) -> Result<Self> {
        require_positive("resolving_power", resolving_power)?;
        Ok(Peaks {
            resolving_power,
            shape,
        })
    }

    /// FWHM (u/e) of the peak at `m_over_q`.
    pub fn fwhm(&self, m_over_q: f64) -> f64 {
        m_over_q / self.resolving_power
    }
}

const MAX_TERMS: usize = 1000;
/// Below this argument erf comes from its series, above it erfc from its continued fraction.
const SERIES_LIMIT: f64 = 2.0;

/// The error function.
///
/// For |x| < 2 the series erf(x) = (2/√π) e^(−x²) Σ 2ⁿ x^(2n+1)/(1·3·…·(2n+1)), whose terms are
/// all positive (no cancellation); beyond, 1 − erfc(x) (Abramowitz & Stegun 7.1.6).
pub fn erf(x: f64) -> f64 {
    if x.is_nan() {
        f64::NAN
    } else if x.abs() < SERIES_LIMIT {
        erf_series(x)
    } else if x > 0.0 {
        1.0 - erfc(x)
    } else {
        erfc(-x) - 1.0
    }
}

/// The complementary error function 1 − erf(x).
///
/// For x ≥ 2 the continued fraction erfc(x) = e^(−x²)/√π · 1/(x + ½/(x + 1/(x + 3⁄2/(x + …))))
/// (Abramowitz & Stegun 7.1.14) by the modified Lentz method (Press et al., Numerical Recipes,
/// §5.2); below, 1 − erf(x) from the series; negative x through erfc(−x) = 2 − erfc(x).
pub fn erfc(x: f64) -> f64 {
    if x.is_nan() {
        f64::NAN
    } else if x < 0.0 {
        2.0 - erfc(-x)
    } else if x < SERIES_LIMIT {
        1.0 - erf_series(x)
    } else if x.is_infinite() {
        0.0
    } else {
        (-x * x).exp() / (std::f64::consts::PI.sqrt() * erfc_fraction(x))
    }
}

fn erf_series(x: f64) -> f64 {
    let x2 = x * x;
    let mut term = x;
    let mut sum = x;
    for n in 1..MAX_TERMS {
        term *= 2.0 * x2 / (2 * n + 1) as f64;
        sum += term;
        if term.abs() <= sum.abs() * f64::EPSILON * 0.25 {
            break;
        }
    }
    2.0 / std::f64::consts::PI.sqrt() * (-x2).exp() * sum
}

/// x + (1/2)/(x + (2/2)/(x + (3/2)/(x + …))).
fn erfc_fraction(x: f64) -> f64 {
    const TINY: f64 = 1e-300;
    let mut f = x;
    let mut c = x;
    let mut d = 0.0;
    for n in 1..MAX_TERMS {
        let a = n as f64 * 0.5;
        d = x + a * d;
        if d.abs() < TINY {
            d = TINY;
        }
        c = x + a / c;
        if c.abs() < TINY {
            c = TINY;
        }
        d = 1.0 / d;
        let delta = c * d;
        f *= delta;
        if (delta - 1.0).abs() < f64::EPSILON {
            break;
        }
    }
    f
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn erf_matches_scipy_values() {
        // Values printed by scipy.special.erf / erfc (scipy 1.17).
        let cases = [
            (0.1, 0.1124629160182849, 0.8875370839817152),
            (0.5, 0.5204998778130465, 0.4795001221869535),
            (1.0, 0.8427007929497148, 0.15729920705028516),
            (2.0, 0.9953222650189527, 0.004677734981047266),
            (3.5, 0.9999992569016276, 7.430983723414129e-07),
            (6.0, 1.0, 2.1519736712498913e-17),
        ];
        for (x, e, c) in cases {
            assert!((erf(x) - e).abs() < 2e-16 * 4.0, "erf({x}) = {}", erf(x));
            assert!((erfc(x) - c).abs() < 1e-14 * c, "erfc({x}) = {}", erfc(x));
            assert_eq!(erf(-x), -erf(x));
        }
        assert_eq!(erf(0.0), 0.0);
    }

    #[test]
    fn series_and_fraction_agree_where_they_meet() {
        let x = SERIES_LIMIT;
        let by_series = 1.0 - erf_series(x);
        let by_fraction = (-x * x).exp() / (std::f64::consts::PI.sqrt() * erfc_fraction(x));
        assert!(
            (by_series - by_fraction).abs() < 1e-15,
            "{by_series} {by_fraction}"
        );
    }

    #[test]
    fn every_shape_has_half_maximum_at_half_fwhm_and_unit_area() {
        for shape in [
            PeakShape::Gaussian,
            PeakShape::Triangular,
            PeakShape::Rectangular,
        ] {
            let (mu, w) = (20.0, 0.1);
            let total = shape.area_in(mu, w, mu - 10.0 * w, mu + 10.0 * w);
            assert!((total - 1.0).abs() < 1e-14, "{shape:?} {total}");
            if shape != PeakShape::Rectangular {
                assert!(
                    (shape.height(mu, w, mu + 0.5 * w) - 0.5).abs() < 1e-14,
                    "{shape:?}"
                );
            }
            let left = shape.area_in(mu, w, mu - 10.0 * w, mu);
            assert!((left - 0.5).abs() < 1e-14, "{shape:?} {left}");
        }
        // A Gaussian puts erf(√(ln 2)) ≈ 0.761 of its area within ±FWHM/2 (from memory).
        let core = PeakShape::Gaussian.area_in(0.0, 1.0, -0.5, 0.5);
        assert!((core - 0.7609681085504878).abs() < 1e-12, "{core}");
        assert_eq!(PeakShape::Triangular.area_in(0.0, 1.0, -0.5, 0.5), 0.75);
    }

    #[test]
    fn far_tails_keep_relative_precision() {
        // Window 6 to 7 FWHM-σ-units right of a Gaussian: erfc difference, not erf difference.
        let s = 1.0 / (2.0 * (2.0 * std::f64::consts::LN_2).sqrt()) * std::f64::consts::SQRT_2;
        let got = PeakShape::Gaussian.area_in(0.0, 1.0, 6.0 * s, 7.0 * s);
        let want = 0.5 * (2.1519736712498913e-17 - erfc(7.0));
        assert!((got - want).abs() < 1e-12 * want);
        assert!(got > 0.0);
    }

    #[test]
    fn shapes_are_named() {
        assert_eq!(PeakShape::parse(" Gaussian").unwrap(), PeakShape::Gaussian);
        assert_eq!(
            PeakShape::parse("triangular").unwrap().label(),
            "triangular"
        );
        assert!(PeakShape::parse("lorentzian").is_err());
        assert!(Peaks::new(0.0, PeakShape::Gaussian).is_err());
        assert!(Peaks::new(f64::NAN, PeakShape::Gaussian).is_err());
    }
}

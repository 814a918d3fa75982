//! Ranking a target isotope's charge states by produced fraction × purity in an acceptance
//! window: the charge state to tune the separator to.

use std::cmp::Ordering;

use super::lines::{Line, LineList};
use super::overlaps::ratio;
use super::peaks::Peaks;
use crate::atoms::{element_by_z, Isotope};
use crate::error::{require_positive, Error, Result};

/// Acceptance window centred on each candidate's m/q. It is applied on the m/q axis with
/// exact ion masses; a half-width in u/e is numerically a half-width in A/q.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum AcceptanceWindow {
    /// ± this many u/e (A/q units).
    HalfWidth(f64),
    /// ± this fraction of the candidate's m/q.
    Relative(f64),
    /// Full width as a multiple of the candidate's FWHM (needs peaks).
    Fwhm(f64),
}

impl AcceptanceWindow {
    fn bounds(&self, m_over_q: f64, peaks: Option<Peaks>) -> Result<(f64, f64)> {
        let half = match *self {
            AcceptanceWindow::HalfWidth(h) => require_positive("aq_window", h)?,
            AcceptanceWindow::Relative(r) => require_positive("relative_window", r)? * m_over_q,
            AcceptanceWindow::Fwhm(k) => {
                let p = peaks.ok_or_else(|| {
                    Error::invalid(
                        "window",
                        "a multiple of the FWHM",
                        "needs a resolving power, or give an A/q or relative window",
                    )
                })?;
                0.5 * require_positive("window_fwhm", k)? * p.fwhm(m_over_q)
            }
        };
        Ok((m_over_q - half, m_over_q + half))
    }
}

/// One charge state of the target isotope, scored.
#[derive(Clone, Debug, PartialEq)]
pub struct ChargeStateRank {
    pub line: Line,
    /// The line's intensity over that of every charge state of the isotope in the list.
    pub fraction: f64,
    /// The line's intensity in its window over the intensity of every line there.
    pub purity: f64,
    /// fraction × purity.
    pub score: f64,
    /// Acceptance window (lower, upper) on the m/q axis (u/e).
    pub window: (f64, f64),
    /// The line that brings most foreign intensity into the window, if any.
    pub main_contaminant: Option<Line>,
    /// Its share of everything in the window.
    pub main_contaminant_share: f64,
}

/// Charge states of `target` present in `lines`, best first (ties: lower charge first).
///
/// Without `peaks` lines are sticks: a line is in a window or not. With peaks each line
/// contributes the part of its peak area that falls inside the window.
pub fn clean_charge_states(
    lines: &LineList,
    target: &Isotope,
    window: AcceptanceWindow,
    peaks: Option<Peaks>,
) -> Result<Vec<ChargeStateRank>> {
    let own: Vec<&Line> = lines
        .lines()
        .iter()
        .filter(|l| l.z == target.z && l.mass_number == target.mass_number)
        .collect();
    let produced: f64 = own.iter().map(|l| l.intensity).sum();
    if own.is_empty() || produced <= 0.0 {
        let symbol = element_by_z(target.z as i64).map_or("?", |e| e.symbol());
        return Err(Error::NoData {
            what: format!("lines of {}{}", target.mass_number, symbol),
            why: "the line list holds no charge state of this isotope with non-zero intensity"
                .into(),
        });
    }
    let content = |l: &Line, lo: f64, hi: f64| -> f64 {
        let share = match peaks {
            Some(p) => p.shape.area_in(l.m_over_q, p.fwhm(l.m_over_q), lo, hi),
            None => f64::from(u8::from(l.m_over_q >= lo && l.m_over_q <= hi)),
        };
        l.intensity * share
    };
    let mut ranks = Vec::with_capacity(own.len());
    for t in own {
        let (lo, hi) = window.bounds(t.m_over_q, peaks)?;
        let signal = content(t, lo, hi);
        let mut total = signal;
        let mut worst: Option<(&Line, f64)> = None;
        for l in lines.lines() {
            if l.is(t.z, t.mass_number, t.charge) {
                continue;
            }
            let c = content(l, lo, hi);
            total += c;
            if c > 0.0 && worst.is_none_or(|(_, w)| c > w) {
                worst = Some((l, c));
            }
        }
        let fraction = t.intensity / produced;
        let purity = ratio(signal, total);
        ranks.push(ChargeStateRank {
            line: t.clone(),
            fraction,
            purity,
            score: fraction * purity,
            window: (lo, hi),
            main_contaminant: worst.map(|(l, _)| l.clone()),
            main_contaminant_share: worst.map_or(0.0, |(_, c)| ratio(c, total)),
        });
    }
    ranks.sort_by(|a, b| {
        b.score
            .partial_cmp(&a.score)
            .unwrap_or(Ordering::Equal)
            .then(a.line.charge.cmp(&b.line.charge))
    });
    Ok(ranks)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::atoms::element;
    use crate::spectrum::lines::test_list as list;
    use crate::spectrum::PeakShape;

    #[test]
    fn a_charge_state_shared_with_residual_gas_loses_to_a_clean_one() {
        // 16O at 4+ sits at A/q 4 with 12C3+ (common practice); 16O at 3+ is alone.
        let lines = list(&[(8, 16, 3, 0.3), (8, 16, 4, 0.4), (6, 12, 3, 0.4)]);
        let o16 = element("O").unwrap().isotope(16).unwrap();
        let ranks =
            clean_charge_states(&lines, o16, AcceptanceWindow::HalfWidth(0.05), None).unwrap();
        assert_eq!(ranks[0].line.charge, 3);
        assert_eq!(ranks[0].purity, 1.0);
        assert!((ranks[0].fraction - 0.3 / 0.7).abs() < 1e-15);
        let second = &ranks[1];
        assert!((second.purity - 0.5).abs() < 1e-15);
        assert_eq!(second.main_contaminant.as_ref().unwrap().label(), "12C3+");
        assert!((second.main_contaminant_share - 0.5).abs() < 1e-15);
    }

    #[test]
    fn high_resolving_power_rescues_the_shared_charge_state() {
        let lines = list(&[(8, 16, 3, 0.3), (8, 16, 4, 0.4), (6, 12, 3, 0.4)]);
        let o16 = element("O").unwrap().isotope(16).unwrap();
        // 16O4+ and 12C3+ differ by ≈ 4e-4 relative in m/q: 30 FWHM apart at R = 1e5.
        let peaks = Peaks::new(1e5, PeakShape::Gaussian).unwrap();
        let ranks =
            clean_charge_states(&lines, o16, AcceptanceWindow::Fwhm(1.0), Some(peaks)).unwrap();
        assert_eq!(ranks[0].line.charge, 4);
        assert!(ranks[0].purity > 1.0 - 1e-12);
        assert!(clean_charge_states(&lines, o16, AcceptanceWindow::Fwhm(1.0), None).is_err());
        assert!(clean_charge_states(&lines, o16, AcceptanceWindow::Relative(-0.1), None).is_err());
        let c13 = element("C").unwrap().isotope(13).unwrap();
        assert!(clean_charge_states(&lines, c13, AcceptanceWindow::Relative(0.01), None).is_err());
    }
}

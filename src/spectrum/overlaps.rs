//! Which lines fall on a target ion at a resolving power, how much of the target's acceptance
//! window each fills, and what resolving power would separate them.
//!
//! Separation criterion: two peaks count as separated when their centres are at least one
//! FWHM apart, so the resolving power needed is R = (m/q)/|Δ(m/q)| with the target's m/q
//! (common practice). Contamination of the target by a line is that line's intensity times
//! the share of its peak inside the target's acceptance window, relative to the target's
//! own signal there; purity is the target's share of everything in the window. Both are
//! exact for the idealised peak shapes of [`super::peaks`]; real separators add tails and
//! background that they do not model.

use std::cmp::Ordering;

use super::lines::{Line, LineList};
use super::peaks::{PeakShape, Peaks};
use crate::atoms::{element_by_z, Isotope};
use crate::error::{require_positive, Error, Result};

/// Resolving power and peak shape, the acceptance window around the target as a multiple of
/// its FWHM (full width; 1 = ±FWHM/2), and how far (in target FWHM) to look for interferers.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct OverlapSettings {
    pub peaks: Peaks,
    pub window_fwhm: f64,
    pub search_fwhm: f64,
}

impl OverlapSettings {
    pub fn new(
        resolving_power: f64,
        shape: PeakShape,
        window_fwhm: f64,
        search_fwhm: f64,
    ) -> Result<Self> {
        Ok(OverlapSettings {
            peaks: Peaks::new(resolving_power, shape)?,
            window_fwhm: require_positive("window_fwhm", window_fwhm)?,
            search_fwhm: require_positive("search_fwhm", search_fwhm)?,
        })
    }
}

/// One line near the target.
#[derive(Clone, Debug, PartialEq)]
pub struct Interference {
    pub line: Line,
    /// m/q of the interferer minus m/q of the target (u/e).
    pub delta_m_over_q: f64,
    /// |Δ(m/q)| in units of the target's FWHM.
    pub separation_fwhm: f64,
    /// Share of the interferer's own peak area inside the target's window.
    pub window_fraction: f64,
    /// Interferer's intensity inside the window relative to the target's own there.
    pub contamination: f64,
    /// (m/q)/|Δ(m/q)| of the target: the resolving power at which the two are one FWHM apart
    /// (+∞ for identical m/q).
    pub resolving_power_needed: f64,
}

/// The neighbourhood of a target line at one resolving power.
#[derive(Clone, Debug, PartialEq)]
pub struct OverlapReport {
    pub target: Line,
    pub settings: OverlapSettings,
    /// FWHM of the target's peak (u/e).
    pub fwhm: f64,
    /// Acceptance window (lower, upper) on the m/q axis (u/e).
    pub window: (f64, f64),
    /// Share of the target's own peak area inside its window.
    pub target_window_fraction: f64,
    /// Lines within `search_fwhm` target FWHM, most contaminating first (then nearest first).
    pub interferences: Vec<Interference>,
    /// Target's intensity in the window over the intensity of every line of the list there.
    pub purity: f64,
}

/// Overlaps of the line of `target` at `charge` with the other lines of `lines`.
pub fn overlaps(
    lines: &LineList,
    target: &Isotope,
    charge: i64,
    settings: &OverlapSettings,
) -> Result<OverlapReport> {
    let t = target_line(lines, target, charge)?;
    let peaks = settings.peaks;
    let fwhm = peaks.fwhm(t.m_over_q);
    let half = 0.5 * settings.window_fwhm * fwhm;
    let (lo, hi) = (t.m_over_q - half, t.m_over_q + half);
    let in_window = |l: &Line| {
        peaks
            .shape
            .area_in(l.m_over_q, peaks.fwhm(l.m_over_q), lo, hi)
    };
    let target_window_fraction = in_window(t);
    let signal = t.intensity * target_window_fraction;
    let mut total = signal;
    let mut interferences = Vec::new();
    for l in lines.lines() {
        if l.is(t.z, t.mass_number, t.charge) {
            continue;
        }
        let window_fraction = in_window(l);
        total += l.intensity * window_fraction;
        let delta = l.m_over_q - t.m_over_q;
        if delta.abs() > settings.search_fwhm * fwhm {
            continue;
        }
        interferences.push(Interference {
            line: l.clone(),
            delta_m_over_q: delta,
            separation_fwhm: delta.abs() / fwhm,
            window_fraction,
            contamination: ratio(l.intensity * window_fraction, signal),
            resolving_power_needed: t.m_over_q / delta.abs(),
        });
    }
    interferences.sort_by(|a, b| {
        b.contamination
            .partial_cmp(&a.contamination)
            .unwrap_or(Ordering::Equal)
            .then(
                a.separation_fwhm
                    .partial_cmp(&b.separation_fwhm)
                    .unwrap_or(Ordering::Equal),
            )
    });
    Ok(OverlapReport {
        target: t.clone(),
        settings: *settings,
        fwhm,
        window: (lo, hi),
        target_window_fraction,
        interferences,
        purity: ratio(signal, total),
    })
}

/// a/b with 0/0 = 0 and x/0 = +∞.
pub(crate) fn ratio(a: f64, b: f64) -> f64 {
    if b > 0.0 {
        a / b
    } else if a > 0.0 {
        f64::INFINITY
    } else {
        0.0
    }
}

/// The target's line, or an error that says which charges of it the list holds.
pub(crate) fn target_line<'a>(
    lines: &'a LineList,
    target: &Isotope,
    charge: i64,
) -> Result<&'a Line> {
    let el = element_by_z(target.z as i64)?;
    el.check_charge(charge, el.z())?;
    if charge == 0 {
        return Err(Error::invalid(
            "charge",
            0,
            "the target needs a charge of 1 or more",
        ));
    }
    lines
        .find(target.z, target.mass_number, charge as u32)
        .ok_or_else(|| {
            let mut charges: Vec<u32> = lines
                .lines()
                .iter()
                .filter(|l| l.z == target.z && l.mass_number == target.mass_number)
                .map(|l| l.charge)
                .collect();
            charges.sort_unstable();
            let present: Vec<String> = charges.iter().map(u32::to_string).collect();
            Error::NoData {
                what: format!("line {}{}{}+", target.mass_number, el.symbol(), charge),
                why: if present.is_empty() {
                    format!(
                        "the line list holds no line of {}{}",
                        target.mass_number,
                        el.symbol()
                    )
                } else {
                    format!(
                        "it has zero intensity or was not produced; charges present: {}",
                        present.join(", ")
                    )
                },
            }
        })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::atoms::element;
    use crate::spectrum::lines::test_list as list;

    #[test]
    fn gaussian_contamination_is_the_ratio_of_window_areas() {
        // 40Ar2+ and 20Ne+ near m/q 20 (common practice).
        let lines = list(&[(18, 40, 2, 1.0), (10, 20, 1, 2.0), (36, 84, 1, 1.0)]);
        let ar = element("Ar").unwrap().isotope(40).unwrap();
        let s = OverlapSettings::new(500.0, PeakShape::Gaussian, 1.0, 3.0).unwrap();
        let r = overlaps(&lines, ar, 2, &s).unwrap();
        assert_eq!(r.interferences.len(), 1);
        let ne = &r.interferences[0];
        assert_eq!(ne.line.label(), "20Ne1+");
        let a_t = PeakShape::Gaussian.area_in(r.target.m_over_q, r.fwhm, r.window.0, r.window.1);
        let a_i = PeakShape::Gaussian.area_in(
            ne.line.m_over_q,
            ne.line.m_over_q / 500.0,
            r.window.0,
            r.window.1,
        );
        assert!((ne.contamination - 2.0 * a_i / a_t).abs() < 1e-12);
        assert!((r.purity - a_t / (a_t + 2.0 * a_i)).abs() < 1e-12);
        assert!(
            (ne.resolving_power_needed - r.target.m_over_q / ne.delta_m_over_q.abs()).abs() < 1e-9
        );
    }

    #[test]
    fn a_rectangular_window_beyond_reach_is_clean() {
        let lines = list(&[(18, 40, 2, 1.0), (10, 20, 1, 2.0)]);
        let ar = element("Ar").unwrap().isotope(40).unwrap();
        // 40Ar2+ sits 1/1777 below 20Ne+ in m/q: at R = 5000 the two are 2.8 FWHM apart.
        let s = OverlapSettings::new(5000.0, PeakShape::Rectangular, 1.0, 10.0).unwrap();
        let r = overlaps(&lines, ar, 2, &s).unwrap();
        assert_eq!(r.purity, 1.0);
        assert_eq!(r.interferences[0].contamination, 0.0);
        assert_eq!(r.target_window_fraction, 1.0);
    }

    #[test]
    fn a_missing_target_says_which_charges_exist() {
        let lines = list(&[(18, 40, 2, 1.0), (18, 40, 3, 1.0)]);
        let ar = element("Ar").unwrap().isotope(40).unwrap();
        let s = OverlapSettings::new(100.0, PeakShape::Gaussian, 1.0, 3.0).unwrap();
        let err = overlaps(&lines, ar, 5, &s).unwrap_err().to_string();
        assert!(err.contains("2, 3"), "{err}");
        assert!(overlaps(&lines, ar, 0, &s).is_err());
        assert!(overlaps(&lines, ar, 19, &s).is_err());
        assert!(OverlapSettings::new(-1.0, PeakShape::Gaussian, 1.0, 3.0).is_err());
        assert!(OverlapSettings::new(1.0, PeakShape::Gaussian, 0.0, 3.0).is_err());
    }
}

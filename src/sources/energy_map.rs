//! The fraction of target charge states over an energy × time grid, for any source whose
//! evolution depends on one energy (electron-beam energy, photon energy), and its maximum.

use ndarray::Array2;
use rayon::prelude::*;

use crate::atoms::Element;
use crate::error::{require_all_positive, Error, Result};

/// Target fraction over an energy × time grid, and where it is largest.
#[derive(Clone, Debug)]
pub struct EnergyTimeMap {
    pub energies_ev: Vec<f64>,
    pub times_s: Vec<f64>,
    /// fraction[energy][time].
    pub fraction: Vec<Vec<f64>>,
    pub best_energy_ev: f64,
    pub best_time_s: f64,
    pub best_fraction: f64,
}

/// Chunks the energies are cut into, so progress can be reported between them while each
/// chunk still runs in parallel.
const PROGRESS_CHUNKS: usize = 8;

/// Evolve at every energy in parallel (`evolve_at(energy)` returns populations [T, Z+1]
/// at `times_s`), sum the `targets` charge states, and call `progress(energies done,
/// energies in all)` on the calling thread before the first chunk of energies and after
/// each one.
pub fn energy_time_map_with_progress(
    element: &Element,
    targets: &[u32],
    energies_name: &str,
    energies_ev: &[f64],
    times_s: &[f64],
    evolve_at: impl Fn(f64) -> Result<Array2<f64>> + Sync,
    progress: &mut dyn FnMut(usize, usize),
) -> Result<EnergyTimeMap> {
    require_all_positive(energies_name, energies_ev)?;
    if energies_ev.is_empty() || times_s.is_empty() {
        return Err(Error::invalid(
            "grid",
            "empty",
            &format!("give at least one value in {energies_name} and one time"),
        ));
    }
    if targets.is_empty() {
        return Err(Error::invalid(
            "charge",
            "none",
            "give at least one target charge state",
        ));
    }
    for q in targets {
        element.check_charge(i64::from(*q), element.z())?;
    }
    crate::limits::check_memory(
        "the energy × time map",
        crate::solve::energy_map_memory_bytes(
            energies_ev.len(),
            times_s.len(),
            element.z() as usize + 1,
        ),
    )?;
    let n = energies_ev.len();
    let chunk = n.div_ceil(PROGRESS_CHUNKS);
    let mut rows: Vec<Vec<f64>> = Vec::with_capacity(n);
    progress(0, n);
    for energies in energies_ev.chunks(chunk) {
        let part: Vec<Vec<f64>> = crate::interrupt::run_polled(|| {
            energies
                .par_iter()
                .map(|e| {
                    crate::interrupt::check()?;
                    let pops = evolve_at(*e)?;
                    Ok(pops
                        .rows()
                        .into_iter()
                        .map(|r| targets.iter().map(|q| r[*q as usize]).sum())
                        .collect())
                })
                .collect::<Result<_>>()
        })?;
        rows.extend(part);
        progress(rows.len(), n);
    }
    let mut best = (0, 0, f64::NEG_INFINITY);
    for (i, row) in rows.iter().enumerate() {
        for (k, v) in row.iter().enumerate() {
            if *v > best.2 {
                best = (i, k, *v);
            }
        }
    }
    Ok(EnergyTimeMap {
        energies_ev: energies_ev.to_vec(),
        times_s: times_s.to_vec(),
        fraction: rows,
        best_energy_ev: energies_ev[best.0],
        best_time_s: times_s[best.1],
        best_fraction: best.2,
    })
}

/// The fraction averaged over a beam whose energies are spread uniformly over `width_ev`
/// around each grid energy: `samples` points from E − w/2 to E + w/2, the map linear in
/// energy between grid points and held at the grid's ends. `fraction[energy][time]`.
pub fn spread_averaged(
    energies_ev: &[f64],
    fraction: &[Vec<f64>],
    width_ev: f64,
    samples: usize,
) -> Vec<Vec<f64>> {
    let n_t = fraction.first().map_or(0, Vec::len);
    if width_ev <= 0.0 || samples < 2 || energies_ev.len() < 2 {
        return fraction.to_vec();
    }
    // Interpolation weights of every sample energy, shared by all times.
    let at = |x: f64| -> (usize, usize, f64) {
        let n = energies_ev.len();
        if x <= energies_ev[0] {
            return (0, 0, 0.0);
        }
        if x >= energies_ev[n - 1] {
            return (n - 1, n - 1, 0.0);
        }
        let hi = energies_ev.partition_point(|e| *e <= x).min(n - 1);
        let lo = hi - 1;
        let span = energies_ev[hi] - energies_ev[lo];
        (
            lo,
            hi,
            if span > 0.0 {
                (x - energies_ev[lo]) / span
            } else {
                0.0
            },
        )
    };
    energies_ev
        .iter()
        .map(|e| {
            let pts: Vec<(usize, usize, f64)> = (0..samples)
                .map(|j| at(e + width_ev * (j as f64 / (samples - 1) as f64 - 0.5)))
                .collect();
            (0..n_t)
                .map(|k| {
                    pts.iter()
                        .map(|(lo, hi, w)| (1.0 - w) * fraction[*lo][k] + w * fraction[*hi][k])
                        .sum::<f64>()
                        / samples as f64
                })
                .collect()
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::atoms::element;

    #[test]
    fn progress_counts_every_energy_once_and_ends_complete() {
        let he = element("He").unwrap();
        let energies: Vec<f64> = (1..=20).map(f64::from).collect();
        let mut seen = Vec::new();
        let map = energy_time_map_with_progress(
            he,
            &[1],
            "energies_ev",
            &energies,
            &[1.0, 2.0],
            // A made-up evolution whose 1+ fraction is e/100 at every time.
            |e| {
                Ok(Array2::from_shape_fn((2, 3), |(_, q)| {
                    if q == 1 {
                        e / 100.0
                    } else {
                        0.0
                    }
                }))
            },
            &mut |done, total| seen.push((done, total)),
        )
        .unwrap();
        assert_eq!(seen.first(), Some(&(0, 20)));
        assert_eq!(seen.last(), Some(&(20, 20)));
        assert!(seen.windows(2).all(|w| w[0].0 < w[1].0));
        assert_eq!(map.best_energy_ev, 20.0);
        assert_eq!(map.fraction.len(), 20);
    }

    #[test]
    fn spread_averaging_of_a_step_is_its_linear_ramp() {
        // A cliff between 10 and 10.001 eV: 1 below, 0 above.
        let e = [0.0, 10.0, 10.001, 20.0];
        let f = vec![vec![1.0], vec![1.0], vec![0.0], vec![0.0]];
        let a = spread_averaged(&e, &f, 4.0, 401);
        // At the cliff half of the beam is above it; 2 eV below the cliff, none is.
        assert!((a[1][0] - 0.5).abs() < 0.01, "{}", a[1][0]);
        assert_eq!(a[0][0], 1.0);
        assert_eq!(a[3][0], 0.0);
        assert_eq!(spread_averaged(&e, &f, 0.0, 17), f);
    }
}

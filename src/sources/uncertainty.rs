//! Monte Carlo uncertainty of a beam trap's charge-state evolution: every process rate is
//! multiplied by a random lognormal factor, the networks are solved in parallel, and the
//! caller reads percentile bands off the samples.
//!
//! # Model
//!
//! Each process p (ionization with excitation–autoionization, recombination radiative and
//! dielectronic, charge exchange) has a 1-σ
//! multiplicative uncertainty f_p. The rate of charge q by process p is scaled by
//!
//!   k_{p,q} = exp( ln f_p · (√ρ · z_p + √(1−ρ) · z_{p,q}) ),
//!
//! with z_p (one per process and sample) and z_{p,q} (one per process, charge and sample)
//! independent standard normals. So ln k_{p,q} is normal with mean 0 (the median factor is 1,
//! the nominal rate) and standard deviation ln f_p; two charges of one process are
//! correlated with coefficient ρ (`charge_correlation`) in ln k, and different processes are
//! independent. ρ = 1 scales a whole process by one factor, ρ = 0 draws every charge apart.
//! The ionization factor scales all impact jumps out of charge q (single, multiple via the
//! vacancy cascade, direct double) together. Escape rates, the feed and photon-beam jumps
//! keep their nominal values.
//!
//! Default factors (the accuracies the models' own documentation states, from memory):
//! Lotz ionization ±35 % (f = 1.35), Kim–Pratt radiative recombination ×1.5,
//! Müller–Salzborn charge exchange ×2; ρ = 0.5 is our assumption (half the logarithmic
//! variance shared along the charge sequence), not a published figure.
//!
//! # Reproducibility
//!
//! Sample i of seed s draws from its own generator (`StdRng`, ChaCha12, seeded from s and i
//! by a SplitMix64 mix), so a sample's factors do not depend on how the samples are split
//! into chunks or threads: any chunking (threads, or workers of a cluster) gives the same
//! bits.
//!
//! # Accuracy
//!
//! Sampling error only: a percentile from n samples has a standard error of about
//! √(p(1−p)/n)/density. Each sample is solved by the same stiff evolution as the nominal run
//! (error 1e-13 of the population per step).

use super::beam_trap::{BeamTrap, Processes};
use crate::atoms::Element;
use crate::error::{require_positive, Error, Result};
use crate::limits::{bytes_for, check_memory};
use crate::network::RateNetwork;
use crate::solve::evolve_batch;
use ndarray::{Array3, Axis};
use rand::rngs::StdRng;
use rand::{RngExt, SeedableRng};
use rand_distr::StandardNormal;

/// 1-σ factor of Lotz ionization cross sections when none is given (±35 %).
pub const DEFAULT_IONIZATION_FACTOR: f64 = 1.35;
/// 1-σ factor of Kim–Pratt radiative recombination when none is given.
pub const DEFAULT_RECOMBINATION_FACTOR: f64 = 1.5;
/// 1-σ factor of Müller–Salzborn charge exchange when none is given.
pub const DEFAULT_CHARGE_EXCHANGE_FACTOR: f64 = 2.0;
/// Correlation ρ of ln k between the charges of one process when none is given.
pub const DEFAULT_CHARGE_CORRELATION: f64 = 0.5;
/// Number of processes with an uncertainty factor.
pub const N_PROCESSES: usize = 3;

/// The uncertainty factors of the processes and their correlation model (see the module
/// documentation).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct UncertaintyFactors {
    /// 1-σ multiplicative factor of the ionization rates (≥ 1).
    pub ionization: f64,
    /// 1-σ multiplicative factor of the radiative-recombination rates (≥ 1).
    pub recombination: f64,
    /// 1-σ multiplicative factor of the charge-exchange rates (≥ 1).
    pub charge_exchange: f64,
    /// Correlation of ln k between the charges of one process, 0…1.
    pub charge_correlation: f64,
}

impl Default for UncertaintyFactors {
    fn default() -> Self {
        UncertaintyFactors {
            ionization: DEFAULT_IONIZATION_FACTOR,
            recombination: DEFAULT_RECOMBINATION_FACTOR,
            charge_exchange: DEFAULT_CHARGE_EXCHANGE_FACTOR,
            charge_correlation: DEFAULT_CHARGE_CORRELATION,
        }
    }
}

impl UncertaintyFactors {
    /// Validated factors: each factor finite and ≥ 1, the correlation in [0, 1].
    pub fn new(
        ionization: f64,
        recombination: f64,
        charge_exchange: f64,
        charge_correlation: f64,
    ) -> Result<Self> {
        for (name, f) in [
            ("ionization_factor", ionization),
            ("recombination_factor", recombination),
            ("charge_exchange_factor", charge_exchange),
        ] {
            if !(f.is_finite() && f >= 1.0) {
                return Err(Error::invalid(
                    name,
                    f,
                    "a 1-sigma multiplicative factor must be finite and >= 1 (1 = exact)",
                ));
            }
        }
        if !(charge_correlation.is_finite() && (0.0..=1.0).contains(&charge_correlation)) {
            return Err(Error::invalid(
                "charge_correlation",
                charge_correlation,
                "a correlation coefficient in [0, 1]",
            ));
        }
        Ok(UncertaintyFactors {
            ionization,
            recombination,
            charge_exchange,
            charge_correlation,
        })
    }

    fn sigmas(&self) -> [f64; N_PROCESSES] {
        [
            self.ionization.ln(),
            self.recombination.ln(),
            self.charge_exchange.ln(),
        ]
    }

    /// Rate factors `[process][charge]` of sample `index` of `seed` for `n_states` charges
    /// (process order: ionization, recombination, charge exchange).
    pub fn sample(&self, seed: u64, index: u64, n_states: usize) -> [Vec<f64>; N_PROCESSES] {
        let mut rng = StdRng::seed_from_u64(splitmix64(seed ^ splitmix64(index)));
        let shared = self.charge_correlation.sqrt();
        let own = (1.0 - self.charge_correlation).sqrt();
        self.sigmas().map(|sigma| {
            let common: f64 = rng.sample(StandardNormal);
            (0..n_states)
                .map(|_| {
                    let z: f64 = rng.sample(StandardNormal);
                    (sigma * (shared * common + own * z)).exp()
                })
                .collect()
        })
    }
}

/// SplitMix64 finaliser: spreads neighbouring seeds and sample indices over the seed space.
fn splitmix64(x: u64) -> u64 {
    let mut z = x.wrapping_add(0x9E37_79B9_7F4A_7C15);
    z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
    z ^ (z >> 31)
}

/// A trap's network split by process, so each part can be scaled on its own.
#[derive(Clone, Debug)]
pub struct ProcessNetworks {
    /// Ionization, recombination, charge exchange (rates only).
    parts: [RateNetwork; N_PROCESSES],
    /// Everything else (photon-beam jumps, loss, feed), kept nominal.
    rest: RateNetwork,
}

impl ProcessNetworks {
    /// Split the network of `element` in `trap`.
    pub fn new(trap: &BeamTrap, element: &'static Element) -> Result<Self> {
        let full = trap.network(element)?;
        let only = |ionization: bool, recombination: bool, charge_exchange: bool| {
            let mut t = trap.clone();
            t.processes = Processes {
                ionization: ionization && trap.processes.ionization,
                multiple_ionization: trap.processes.multiple_ionization,
                radiative_recombination: recombination && trap.processes.radiative_recombination,
                charge_exchange: charge_exchange && trap.processes.charge_exchange,
                // Indirect channels share the factor of their direct partner.
                excitation_autoionization: ionization && trap.processes.excitation_autoionization,
                dielectronic_recombination: recombination
                    && trap.processes.dielectronic_recombination,
            };
            t.loss_per_s = Vec::new();
            t.feed = None;
            t.photon_beam = None;
            t.network(element)
        };
        let parts = [
            only(true, false, false)?,
            only(false, true, false)?,
            only(false, false, true)?,
        ];
        let n = full.n_states();
        let mut rest = RateNetwork::new(n)?;
        for from in 0..n {
            for to in 0..n {
                if from == to {
                    continue;
                }
                let total = full.rate(from, to);
                let parts_sum: f64 = parts.iter().map(|p| p.rate(from, to)).sum();
                // Rounding of the sum leaves ~1e-16 of the rate; only a real remainder
                // (photon jumps) is kept.
                let left = total - parts_sum;
                if left > 1e-12 * total {
                    rest.add_rate(from, to, left)?;
                }
            }
            rest.set_loss(from, full.loss_per_s()[from])?;
            rest.set_feed(from, full.feed_per_s()[from])?;
        }
        Ok(ProcessNetworks { parts, rest })
    }

    /// Number of states.
    pub fn n_states(&self) -> usize {
        self.rest.n_states()
    }

    /// The network with the rates out of charge q of process p multiplied by
    /// `factors[p][q]`.
    pub fn scaled(&self, factors: &[Vec<f64>; N_PROCESSES]) -> Result<RateNetwork> {
        let mut net = self.rest.clone();
        let n = net.n_states();
        for (part, k) in self.parts.iter().zip(factors) {
            for from in 0..n {
                let scale = k.get(from).copied().unwrap_or(1.0);
                for (to, rate) in part.rates_from(from).iter().enumerate() {
                    if *rate > 0.0 {
                        net.add_rate(from, to, rate * scale)?;
                    }
                }
            }
        }
        Ok(net)
    }
}

/// Populations `[samples, times, Z+1]` of samples `first_sample … first_sample+count−1`
/// of `seed` for atoms of `element` starting in `initial_charge`, solved in parallel.
#[allow(clippy::too_many_arguments)] // each is a separate setting of the run
pub fn monte_carlo(
    trap: &BeamTrap,
    element: &'static Element,
    initial_charge: u32,
    times_s: &[f64],
    factors: &UncertaintyFactors,
    seed: u64,
    first_sample: u64,
    count: usize,
) -> Result<Array3<f64>> {
    element.check_charge(i64::from(initial_charge), element.z())?;
    require_positive("samples", count as f64)?;
    let split = ProcessNetworks::new(trap, element)?;
    let n = split.n_states();
    check_memory(
        "the Monte Carlo samples",
        bytes_for(&[count, times_s.len(), n], 8)
            .saturating_add(bytes_for(&[count, n, n], 8).saturating_mul(2)),
    )?;
    let mut initial = vec![0.0; n];
    initial[initial_charge as usize] = 1.0;
    let problems = (0..count as u64)
        .map(|i| {
            let k = factors.sample(seed, first_sample + i, n);
            Ok((split.scaled(&k)?, initial.clone()))
        })
        .collect::<Result<Vec<_>>>()?;
    let mut out = Array3::zeros((count, times_s.len(), n));
    for (mut slot, result) in out
        .axis_iter_mut(Axis(0))
        .zip(evolve_batch(&problems, times_s))
    {
        slot.assign(&result?);
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::atoms::element;
    use crate::sources::ElectronBeam;

    fn trap() -> BeamTrap {
        let beam = ElectronBeam::with_radius(3000.0, 0.1, 50e-6).unwrap();
        BeamTrap::new(beam, 0.5, &[("H2".into(), 1e-8)], 50.0).unwrap()
    }

    #[test]
    fn factors_are_reproducible_and_lognormal() {
        let f = UncertaintyFactors::default();
        assert_eq!(f.sample(7, 3, 10), f.sample(7, 3, 10));
        assert_ne!(f.sample(7, 3, 10), f.sample(7, 4, 10));
        // ln k of the ionization factor: mean 0, standard deviation ln 1.35.
        let logs: Vec<f64> = (0..4000).map(|i| f.sample(1, i, 1)[0][0].ln()).collect();
        let mean = logs.iter().sum::<f64>() / logs.len() as f64;
        let sd = (logs.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / logs.len() as f64).sqrt();
        assert!(mean.abs() < 4.0 * 1.35f64.ln() / 4000f64.sqrt());
        assert!((sd / 1.35f64.ln() - 1.0).abs() < 0.05);
        assert!(UncertaintyFactors::new(0.9, 1.5, 2.0, 0.5).is_err());
        assert!(UncertaintyFactors::new(1.3, 1.5, 2.0, 1.5).is_err());
    }

    #[test]
    fn unit_factors_rebuild_the_nominal_network() {
        let t = trap();
        let ar = element("Ar").unwrap();
        let split = ProcessNetworks::new(&t, ar).unwrap();
        let one = [vec![1.0; 19], vec![1.0; 19], vec![1.0; 19]];
        let rebuilt = split.scaled(&one).unwrap();
        let nominal = t.network(ar).unwrap();
        for from in 0..19 {
            for to in 0..19 {
                let (a, b) = (rebuilt.rate(from, to), nominal.rate(from, to));
                assert!((a - b).abs() <= 1e-14 * b.abs(), "{from}->{to}: {a} vs {b}");
            }
        }
    }

    #[test]
    fn chunks_give_the_same_bits() {
        let t = trap();
        let ar = element("Ar").unwrap();
        let times = [0.0, 1e-3, 1e-2, 0.1];
        let f = UncertaintyFactors::default();
        let all = monte_carlo(&t, ar, 0, &times, &f, 11, 0, 6).unwrap();
        let tail = monte_carlo(&t, ar, 0, &times, &f, 11, 4, 2).unwrap();
        assert_eq!(all.index_axis(Axis(0), 4), tail.index_axis(Axis(0), 0));
        assert_eq!(all.index_axis(Axis(0), 5), tail.index_axis(Axis(0), 1));
        for s in all.axis_iter(Axis(0)) {
            for row in s.rows() {
                assert!((row.sum() - 1.0).abs() < 1e-10);
                assert!(row.iter().all(|v| *v >= 0.0));
            }
        }
    }
}

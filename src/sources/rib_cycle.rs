//! Radioactive-beam charge breeding in an electron-beam trap: 1+ ions of a radioactive
//! nuclide injected, captured, bred and extracted at a repetition rate, with decay during
//! breeding. Gives the ions per second of each charge state at the separator, the isobaric
//! daughters among them and the efficiency into each charge state.
//!
//! # The cycle
//!
//! Every period T = 1/f_rep one bunch of N_b ions of charge `injected_charge` (usually 1)
//! reaches the trap: N_b = R·T for a continuous rate R accumulated upstream, or N_b given per
//! bunch. For a continuous rate the ions wait upstream for the next injection; those that
//! decay while waiting (fraction 1 − (1 − e^{−λT})/(λT), arrivals uniform over T) count as
//! decayed, their products as lost. A fraction ε (`capture_efficiency`, default
//! [`DEFAULT_CAPTURE_EFFICIENCY`]) of the bunch is captured, the rest is lost. The captured
//! ions are bred for the breeding time t_b ≤ T and then every ion in the trap is extracted.
//!
//! # Decay in the trap
//!
//! Each nuclide k (the injected one and its descendants, followed through the embedded decay
//! channels, [`crate::atoms::decay`]) has its own charge-state network M_k in the trap
//! ([`BeamTrap::network`]: ionization, recombination, charge exchange). They are coupled
//! into one network by the decays: state (k, q) goes to (k′, q′) at b_{k→k′} λ_k, with
//! λ_k = ln 2 / T½ the decay constant (the same for every charge state: bound-state β decay
//! and changes of electron-capture rates in highly charged ions are neglected; both matter
//! only for a few nuclides, e.g. ¹⁸⁷Re, ¹⁶³Dy, from memory). Channels whose products are not
//! followed (fission, particle emission, nuclides beyond `max_nuclides`) go to an absorbing
//! "decayed, not followed" state; escape rates of the trap go to absorbing "lost" states. So
//! the populations of the coupled network add up to the captured ions at every time, and
//!
//!   trapped + extracted + decayed + lost = injected
//!
//! holds by the solver's conservation (checked to 1e-9 relative in the tests). With
//! ionization alone, the summed charge states of each nuclide follow the Bateman solution of
//! the decay chain (H. Bateman, Proc. Cambridge Philos. Soc. 15, 423 (1910)), as tested.
//!
//! # The daughter's charge state
//!
//! By default ([`DaughterCharge::Parent`]) a daughter enters the network at its parent's
//! charge state q. Keeping every electron of the parent ion gives instead q + ΔZ
//! ([`DaughterCharge::ElectronsKept`]: q+1 after β⁻, q after electron capture, q−1 after
//! β⁺, q−2 after α), and shake-off — the sudden change of the nuclear charge ejecting
//! bound electrons, probability of order 10–20 % per β⁻ decay for light atoms, and several
//! electrons after α decay and the recoil (from memory) — raises it further. For a daughter
//! bred further in the beam the entry charge matters little once t_b exceeds its own
//! breeding time; for short breeding it shifts the daughter's lines by one or two charge
//! states. Charges are clamped to 0…Z′.
//!
//! # Validity
//!
//! The trap model of [`BeamTrap`] (fixed ion temperature, ions inside the beam); captured
//! ions start in `injected_charge`; the trap is emptied at every extraction (no ions carried
//! over between cycles); injection takes no time. Accuracy is that of the trap model and of
//! the embedded half-lives (mendeleev 1.3.0).

use super::beam_trap::BeamTrap;
use crate::atoms::{element_by_z, parse_species, DecayMode, Element, Species};
use crate::error::{require_positive, Error, Result};
use crate::network::RateNetwork;
use crate::solve::evolve;

/// Capture efficiency when none is given: the fraction of an injected 1+ bunch that the
/// trap captures. 0.5 is a middle value of the tens of percent that charge breeders report
/// (common practice); give the measured value of your breeder.
pub const DEFAULT_CAPTURE_EFFICIENCY: f64 = 0.5;
/// Most nuclides followed along the decay chains when none is given.
pub const DEFAULT_MAX_NUCLIDES: usize = 8;
/// Largest `max_nuclides` accepted: 32 nuclides of up to 100 charge states keep the
/// coupled network at a few thousand states.
pub const MAX_CHAIN_NUCLIDES: usize = 32;

/// How many ions arrive.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Injection {
    /// A continuous beam of 1+ ions (ions per second), accumulated upstream between
    /// injections.
    PerSecond(f64),
    /// Ions per bunch arriving at the trap.
    PerBunch(f64),
}

/// Which charge state a daughter nucleus enters the network in (see the module docs).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum DaughterCharge {
    /// The parent ion's charge state.
    Parent,
    /// Every electron of the parent ion stays: q + (Z′ − Z) for β decays and α, q for EC.
    ElectronsKept,
}

impl DaughterCharge {
    /// "parent" or "electrons_kept".
    pub fn label(&self) -> &'static str {
        match self {
            DaughterCharge::Parent => "parent",
            DaughterCharge::ElectronsKept => "electrons_kept",
        }
    }
    /// Parse a label of [`DaughterCharge::label`].
    pub fn parse(text: &str) -> Result<Self> {
        match text {
            "parent" => Ok(DaughterCharge::Parent),
            "electrons_kept" => Ok(DaughterCharge::ElectronsKept),
            other => Err(Error::invalid(
                "daughter_charge",
                format!("{other:?}"),
                "must be \"parent\" (daughters enter at the parent's charge state) or \
                 \"electrons_kept\" (the parent's electrons stay: q+1 after beta-, q-2 after alpha)",
            )),
        }
    }
}

/// Settings of the breeding cycle, validated by [`BreedingCycle::new`].
#[derive(Clone, Debug, PartialEq)]
pub struct BreedingCycle {
    pub z: u32,
    pub mass_number: u32,
    pub injection: Injection,
    pub capture_efficiency: f64,
    pub repetition_rate_hz: f64,
    pub breeding_time_s: f64,
    pub injected_charge: u32,
    pub daughter_charge: DaughterCharge,
    pub max_nuclides: usize,
}

impl BreedingCycle {
    /// A cycle for nuclide (`z`, `mass_number`) with every rule checked here: injection
    /// finite and > 0, capture efficiency in (0, 1], repetition rate > 0, breeding time
    /// > 0 and at most the period 1/f_rep, injected charge 0…Z, at least one nuclide.
    #[allow(clippy::too_many_arguments)]
    pub fn new(
        z: u32,
        mass_number: u32,
        injection: Injection,
        capture_efficiency: f64,
        repetition_rate_hz: f64,
        breeding_time_s: f64,
        injected_charge: u32,
        daughter_charge: DaughterCharge,
        max_nuclides: usize,
    ) -> Result<Self> {
        let el = element_by_z(i64::from(z))?;
        el.isotope(mass_number)?;
        match injection {
            Injection::PerSecond(r) => require_positive("ions_per_s", r)?,
            Injection::PerBunch(n) => require_positive("ions_per_bunch", n)?,
        };
        if !(capture_efficiency > 0.0 && capture_efficiency <= 1.0) {
            return Err(Error::invalid(
                "capture_efficiency",
                capture_efficiency,
                "must be a fraction in (0, 1]",
            ));
        }
        require_positive("repetition_rate_hz", repetition_rate_hz)?;
        require_positive("breeding_time_s", breeding_time_s)?;
        let period = 1.0 / repetition_rate_hz;
        if breeding_time_s > period * (1.0 + 1e-12) {
            return Err(Error::invalid(
                "breeding_time_s",
                breeding_time_s,
                &format!(
                    "must be at most the cycle period 1/repetition_rate_hz = {period} s \
                     (one charge is bred at a time)"
                ),
            ));
        }
        el.check_charge(i64::from(injected_charge), el.z())?;
        if !(1..=MAX_CHAIN_NUCLIDES).contains(&max_nuclides) {
            return Err(Error::invalid(
                "max_nuclides",
                max_nuclides,
                &format!("must be 1 (the injected nuclide alone) ..= {MAX_CHAIN_NUCLIDES}"),
            ));
        }
        Ok(BreedingCycle {
            z,
            mass_number,
            injection,
            capture_efficiency,
            repetition_rate_hz,
            breeding_time_s,
            injected_charge,
            daughter_charge,
            max_nuclides,
        })
    }

    fn period_s(&self) -> f64 {
        1.0 / self.repetition_rate_hz
    }

    /// Ions arriving per bunch.
    pub fn ions_per_bunch(&self) -> f64 {
        match self.injection {
            Injection::PerSecond(r) => r * self.period_s(),
            Injection::PerBunch(n) => n,
        }
    }
}

/// (Z, A) of an isotope named as the species parser reads it ("97Rb", "Rb-97"); an element
/// alone (its natural mix) is refused, the cycle needs one nuclide.
pub fn nuclide(spec: &str) -> Result<(u32, u32)> {
    match parse_species(spec)? {
        Species::Isotope(el, iso) => Ok((el.z(), iso.mass_number)),
        Species::Natural(el) => Err(Error::invalid(
            "isotope",
            format!("{spec:?}"),
            &format!(
                "give one isotope with its mass number, e.g. \"97{}\" (not the natural mix of an element)",
                el.symbol()
            ),
        )),
    }
}

/// One nuclide of the coupled network.
#[derive(Clone, Debug, PartialEq)]
pub struct Nuclide {
    pub z: u32,
    pub mass_number: u32,
    pub symbol: String,
    /// Decay constant (s⁻¹), 0 for a stable nuclide (or one without a half-life).
    pub decay_rate_per_s: f64,
    /// Followed channels: (mode, branching, index of the daughter in the nuclide list).
    pub channels: Vec<(DecayMode, f64, usize)>,
    /// Branching into products that are not followed.
    pub unfollowed_branching: f64,
}

impl Nuclide {
    /// Isotope label, e.g. "97Rb".
    pub fn label(&self) -> String {
        format!("{}{}", self.mass_number, self.symbol)
    }
}

/// The nuclides reached from (z, a) through the decay channels, breadth first, at most
/// `max` of them. The first is the injected nuclide.
pub fn decay_chain(z: u32, a: u32, max: usize) -> Result<Vec<Nuclide>> {
    let mut list: Vec<Nuclide> = Vec::new();
    let mut queue = vec![(z, a)];
    let mut head = 0;
    while head < queue.len() {
        let (z, a) = queue[head];
        head += 1;
        let el = element_by_z(i64::from(z))?;
        let iso = el.isotope(a)?;
        let mut nuclide = Nuclide {
            z,
            mass_number: a,
            symbol: el.symbol().to_string(),
            decay_rate_per_s: 0.0,
            channels: Vec::new(),
            unfollowed_branching: 0.0,
        };
        if let Some((decay, rate)) = iso
            .decay
            .as_ref()
            .and_then(|d| d.decay_rate_per_s().map(|r| (d, r)))
        {
            nuclide.decay_rate_per_s = rate;
            if decay.modes.is_empty() {
                nuclide.unfollowed_branching = 1.0;
            }
            for &(mode, share) in &decay.modes {
                let daughter = mode.daughter(z, a).filter(|&(dz, da)| {
                    element_by_z(i64::from(dz)).is_ok_and(|e| e.isotope(da).is_ok())
                });
                let index = daughter.and_then(|d| {
                    queue.iter().position(|&x| x == d).or_else(|| {
                        (queue.len() < max).then(|| {
                            queue.push(d);
                            queue.len() - 1
                        })
                    })
                });
                match index {
                    Some(i) => nuclide.channels.push((mode, share, i)),
                    None => nuclide.unfollowed_branching += share,
                }
            }
        }
        list.push(nuclide);
    }
    Ok(list)
}

/// The breeding cycle's result: per bunch and per second.
#[derive(Clone, Debug, PartialEq)]
pub struct CycleResult {
    pub nuclides: Vec<Nuclide>,
    /// Output times within the breeding (s), the last one the extraction.
    pub times_s: Vec<f64>,
    /// Ions per bunch of each nuclide (outer) at each time (middle) in each charge state
    /// 0…Z_k (inner).
    pub ions: Vec<Vec<Vec<f64>>>,
    pub ions_per_bunch: f64,
    pub decayed_before_injection: f64,
    pub not_captured: f64,
    /// Per time: injected nuclide lost from the trap by escape.
    pub lost_in_trap: Vec<f64>,
    /// Per time: injected ions that decayed in the trap (all descendants, followed or not,
    /// in the trap or lost).
    pub decayed_in_trap: Vec<f64>,
    pub repetition_rate_hz: f64,
    /// The rule the daughters' entry charge followed (reports name it).
    pub daughter_charge: DaughterCharge,
}

impl CycleResult {
    /// Ions of nuclide `k` per bunch in each charge state at extraction.
    pub fn extracted_per_bunch(&self, k: usize) -> &[f64] {
        self.ions[k].last().map_or(&[], |v| v.as_slice())
    }
    /// Ions of nuclide `k` per second in each charge state at the separator.
    pub fn extracted_per_s(&self, k: usize) -> Vec<f64> {
        self.extracted_per_bunch(k)
            .iter()
            .map(|n| n * self.repetition_rate_hz)
            .collect()
    }
    /// Fraction of injected ions that leave in each charge state of the injected nuclide.
    pub fn efficiency(&self) -> Vec<f64> {
        self.extracted_per_bunch(0)
            .iter()
            .map(|n| n / self.ions_per_bunch)
            .collect()
    }
    /// Bookkeeping per bunch at output `t`: (trapped, decayed, lost) of the injected
    /// nuclide, decayed counting the wait upstream and lost the uncaptured ions; their sum
    /// is the bunch.
    pub fn balance(&self, t: usize) -> (f64, f64, f64) {
        let trapped: f64 = self.ions[0][t].iter().sum();
        (
            trapped,
            self.decayed_before_injection + self.decayed_in_trap[t],
            self.not_captured + self.lost_in_trap[t],
        )
    }
}

/// Run the breeding cycle in `trap` at `times_s` within the breeding time (ascending, the
/// last equal to the breeding time is added if missing).
pub fn run_cycle(trap: &BeamTrap, cycle: &BreedingCycle, times_s: &[f64]) -> Result<CycleResult> {
    let nuclides = decay_chain(cycle.z, cycle.mass_number, cycle.max_nuclides)?;
    let elements: Vec<&'static Element> = nuclides
        .iter()
        .map(|n| element_by_z(i64::from(n.z)))
        .collect::<Result<_>>()?;
    // State layout: nuclide blocks of Z_k + 1 charge states, then three absorbing states.
    let mut offsets = Vec::with_capacity(nuclides.len());
    let mut n_states = 0;
    for n in &nuclides {
        offsets.push(n_states);
        n_states += n.z as usize + 1;
    }
    let (lost_parent, lost_descendants, unfollowed) = (n_states, n_states + 1, n_states + 2);
    let mut net = RateNetwork::new(n_states + 3)?;
    for (k, (nuclide, el)) in nuclides.iter().zip(&elements).enumerate() {
        // Escape rates apply to the injected element only (they are given per its charge
        // states); a daughter's block has none.
        let mut block_trap = trap.clone();
        block_trap.feed = None;
        if k > 0 {
            block_trap.loss_per_s = Vec::new();
        }
        let block = block_trap.network(el)?;
        let off = offsets[k];
        let lost = if k == 0 {
            lost_parent
        } else {
            lost_descendants
        };
        for from in 0..block.n_states() {
            for (to, &rate) in block.rates_from(from).iter().enumerate() {
                if rate > 0.0 {
                    net.add_rate(off + from, off + to, rate)?;
                }
            }
            let loss = block.loss_per_s()[from];
            if loss > 0.0 {
                net.add_rate(off + from, lost, loss)?;
            }
            let lambda = nuclide.decay_rate_per_s;
            if lambda > 0.0 {
                for &(mode, share, d) in &nuclide.channels {
                    let zd = nuclides[d].z as i64;
                    let shift = match cycle.daughter_charge {
                        DaughterCharge::Parent => 0,
                        DaughterCharge::ElectronsKept => {
                            i64::from(mode.charge_change_electrons_kept())
                        }
                    };
                    let qd = (from as i64 + shift).clamp(0, zd) as usize;
                    net.add_rate(off + from, offsets[d] + qd, lambda * share)?;
                }
                if nuclide.unfollowed_branching > 0.0 {
                    net.add_rate(
                        off + from,
                        unfollowed,
                        lambda * nuclide.unfollowed_branching,
                    )?;
                }
            }
        }
    }
    let mut times: Vec<f64> = times_s.to_vec();
    if times.last().is_none_or(|&t| t < cycle.breeding_time_s) {
        times.push(cycle.breeding_time_s);
    }
    if let Some(&t) = times.iter().find(|&&t| t > cycle.breeding_time_s) {
        return Err(Error::invalid(
            "times_s",
            t,
            &format!(
                "must lie within the breeding time 0..={} s",
                cycle.breeding_time_s
            ),
        ));
    }
    // The bunch: arrivals spread over the period wait upstream and decay there.
    let bunch = cycle.ions_per_bunch();
    let lambda0 = nuclides[0].decay_rate_per_s;
    let surviving = match cycle.injection {
        Injection::PerSecond(_) if lambda0 > 0.0 => {
            let x = lambda0 * cycle.period_s();
            // (1 − e^{−x})/x, with its series where x is small.
            let share = if x < 1e-8 {
                1.0 - x / 2.0
            } else {
                -f64::exp_m1(-x) / x
            };
            bunch * share
        }
        _ => bunch,
    };
    let captured = surviving * cycle.capture_efficiency;
    let mut initial = vec![0.0; net.n_states()];
    initial[cycle.injected_charge as usize] = captured;
    let pops = evolve(&net, &initial, &times)?;
    let ions = nuclides
        .iter()
        .enumerate()
        .map(|(k, n)| {
            (0..times.len())
                .map(|t| {
                    (0..=n.z as usize)
                        .map(|q| pops[[t, offsets[k] + q]])
                        .collect()
                })
                .collect()
        })
        .collect();
    let descendants_start = offsets.get(1).copied().unwrap_or(lost_parent);
    let decayed_in_trap = (0..times.len())
        .map(|t| {
            (descendants_start..lost_parent)
                .chain([lost_descendants, unfollowed])
                .map(|i| pops[[t, i]])
                .sum()
        })
        .collect();
    Ok(CycleResult {
        times_s: times.clone(),
        ions,
        ions_per_bunch: bunch,
        decayed_before_injection: bunch - surviving,
        not_captured: surviving - captured,
        lost_in_trap: (0..times.len()).map(|t| pops[[t, lost_parent]]).collect(),
        decayed_in_trap,
        repetition_rate_hz: cycle.repetition_rate_hz,
        daughter_charge: cycle.daughter_charge,
        nuclides,
    })
}

#[cfg(test)]
mod tests;

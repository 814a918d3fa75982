//! The right-hand side of the ion-dynamics model (see the parent module for the equations)
//! and the diagnostics derived from a state: temperatures, overlaps, escape fluxes,
//! compensation and well depth.

use crate::error::Result;
use crate::processes::charge_exchange::mean_ion_speed_m_s;
use crate::processes::coulomb_logarithm::ion_ion_coulomb_log;
use crate::processes::escape::{escape_energy_ev, escape_rate_per_s};
use crate::processes::ion_collisions::{
    energy_exchange_rate_per_s, ion_collision_rate_per_s, IonCloud,
};
use crate::processes::radial_well::{beam_edge_potential_v, RadialWell};
use crate::solve::stiff::{StiffSystem, StiffTolerances};
use ndarray::Array2;

use super::super::beam_trap::BeamTrap;
use super::rates::{gas_temperature_ev, SpeciesRates};
use super::{DynamicsSwitches, TrapDynamics};

/// Populations below this fraction of the particle scale are too small for their own
/// temperature to be resolved (see `derive`).
const REGULARISATION: f64 = 1e-12;

/// Temperatures are held above 1e-4 eV (about 1 K) in the rates: trial states of a
/// Newton iteration may have U ≈ 0 with N > 0, where the collision rates (∝ T^-3/2) would
/// overflow. No trapped ion cloud is that cold.
const MIN_TEMPERATURE_EV: f64 = 1e-4;

/// Running totals appended to the state vector.
pub(crate) const TOTALS: usize = 6;
/// Index of each running total after the populations.
pub(crate) const FED: usize = 0;
pub(crate) const ESCAPED: usize = 1;
pub(crate) const HEAT_IN: usize = 2;
pub(crate) const IONIZATION_HEAT_IN: usize = 3;
pub(crate) const ENERGY_OUT: usize = 4;
pub(crate) const FEED_ENERGY_IN: usize = 5;

/// The model as a stiff system: populations and thermal contents of every species, then
/// the running totals.
pub(crate) struct TrapSystem {
    pub species: Vec<SpeciesRates>,
    /// Start of each species' block (N_0…N_Z, then U_0…U_Z).
    pub offsets: Vec<usize>,
    pub dim: usize,
    pub switches: DynamicsSwitches,
    pub axial_barrier_v: f64,
    pub drift_tube_radius_m: f64,
    pub beam_radius_m: f64,
    pub length_m: f64,
    pub edge_potential_v: f64,
    pub electrons: f64,
    pub fixed_compensation: f64,
    pub gas_temperature_ev: f64,
    pub initial_temperature_ev: f64,
    /// Particle scale for the tolerances and the temperature regularisation.
    pub scale: f64,
}

/// Everything derived from one state that the right-hand side and the outputs share.
#[derive(Clone)]
pub(crate) struct Derived {
    pub compensation: f64,
    pub well_depth_v: f64,
    /// Per species, per charge: N ≥ 0, T, overlap, cloud area (m²), ⟨φ⟩ inside (V).
    pub n: Vec<Vec<f64>>,
    pub t: Vec<Vec<f64>>,
    /// Thermal energy per particle that a moving particle takes along (eV): U/N exactly, so
    /// that the energy moved is the rate times U. (The regularised T, which the rates use,
    /// differs from U/N only for nearly empty populations: carried at that T, such a
    /// population was drained below U = 0, or filled with energy it never let go.)
    pub carry: Vec<Vec<f64>>,
    pub overlap: Vec<Vec<f64>>,
    pub area: Vec<Vec<f64>>,
    pub mean_phi: Vec<Vec<f64>>,
    /// Total ion–ion collision rate (s⁻¹) of each population.
    pub collisions: Vec<Vec<f64>>,
    /// d(N kT)/dt (eV/s) of each population from energy exchange with all others.
    pub exchange: Vec<Vec<f64>>,
    /// Escape rates (s⁻¹) over the axial and the radial barrier.
    pub axial: Vec<Vec<f64>>,
    pub radial: Vec<Vec<f64>>,
}

impl TrapSystem {
    pub(crate) fn new(
        trap: &BeamTrap,
        dynamics: &TrapDynamics,
        species: Vec<SpeciesRates>,
    ) -> Result<Self> {
        let mut offsets = Vec::with_capacity(species.len());
        let mut dim = 0;
        for s in &species {
            offsets.push(dim);
            dim += 2 * (s.z + 1);
        }
        let electrons = trap.electrons_in_trap();
        let initial: f64 = species.iter().map(|s| s.initial_atoms).sum();
        let fed: f64 = species
            .iter()
            .map(|s| s.feed_per_s.iter().sum::<f64>())
            .sum();
        // Populations are measured against what the trap can hold and what is put in.
        let scale = initial.max(electrons).max(fed * 1e-3).max(1.0);
        Ok(TrapSystem {
            species,
            offsets,
            dim: dim + TOTALS,
            switches: dynamics.switches,
            axial_barrier_v: dynamics.axial_barrier_v,
            drift_tube_radius_m: dynamics.drift_tube_radius_m,
            beam_radius_m: trap.beam.radius_m,
            length_m: trap.length_m,
            edge_potential_v: beam_edge_potential_v(trap.beam.current_a, trap.beam.speed_m_s()),
            electrons,
            fixed_compensation: trap.compensation,
            gas_temperature_ev: gas_temperature_ev(trap),
            initial_temperature_ev: trap.ion_temperature_ev,
            scale,
        })
    }

    /// Index of N_sq and U_sq.
    pub(crate) fn n_index(&self, s: usize, q: usize) -> usize {
        self.offsets[s] + q
    }
    pub(crate) fn u_index(&self, s: usize, q: usize) -> usize {
        self.offsets[s] + self.species[s].z + 1 + q
    }
    pub(crate) fn total_index(&self, k: usize) -> usize {
        self.dim - TOTALS + k
    }

    /// Atoms at t = 0 in charge 0 at the initial temperature; totals zero.
    pub(crate) fn initial_state(&self) -> Vec<f64> {
        let mut y = vec![0.0; self.dim];
        for (s, sp) in self.species.iter().enumerate() {
            y[self.n_index(s, 0)] = sp.initial_atoms;
            y[self.u_index(s, 0)] = sp.initial_atoms * self.initial_temperature_ev;
        }
        y
    }

    /// Tolerances: `rtol`, and absolute ones at 1e-3·rtol of the particle scale (U at 1 eV).
    pub(crate) fn tolerances(&self, rtol: f64) -> StiffTolerances {
        let a = self.scale * rtol * 1e-3;
        let mut atol = vec![a; self.dim];
        for k in 0..TOTALS {
            atol[self.dim - TOTALS + k] = a * 1e3;
        }
        StiffTolerances { rtol, atol }
    }

    /// Populations at or below the regularisation level exchange no energy and add no
    /// collisions: their share of any rate is below the solver's resolution.
    fn negligible(&self) -> f64 {
        self.scale * REGULARISATION
    }

    fn well(&self, compensation: f64) -> RadialWell {
        RadialWell {
            edge_potential_v: self.edge_potential_v,
            beam_radius_m: self.beam_radius_m,
            drift_tube_radius_m: self.drift_tube_radius_m,
            compensation,
        }
    }

    /// Temperatures, overlaps, cloud sizes, escape rates and the well from a state.
    pub(crate) fn derive(&self, y: &[f64]) -> Derived {
        self.derive_with(y, None)
    }

    /// The state's N ≥ 0, regularised T and carried energy per particle of population
    /// (s, q): T = (U + ε T₀)/(N + ε), ε at the solver's absolute noise level, so a
    /// population too small to resolve takes the initial temperature for its rates and one
    /// well above it its own U/N; the carried energy is U/N itself (see [`Derived`]). U,
    /// the conserved quantity, is never altered.
    fn population(&self, y: &[f64], s: usize, q: usize) -> (f64, f64, f64) {
        let eps = self.scale * REGULARISATION;
        let n = y[self.n_index(s, q)].max(0.0);
        let u = y[self.u_index(s, q)].max(0.0);
        let t = ((u + eps * self.initial_temperature_ev) / (n + eps)).max(MIN_TEMPERATURE_EV);
        let carry = if n > 0.0 { u / n } else { t };
        (n, t, carry)
    }

    /// As [`Self::derive`], with the compensation given instead of computed (for the
    /// Jacobian's compensation column).
    fn derive_with(&self, y: &[f64], compensation: Option<f64>) -> Derived {
        let sw = self.switches;
        let mut n = Vec::with_capacity(self.species.len());
        let mut t = Vec::with_capacity(self.species.len());
        let mut carry = Vec::with_capacity(self.species.len());
        let mut charge = 0.0;
        for (s, sp) in self.species.iter().enumerate() {
            let (mut ns, mut ts, mut cs) = (Vec::new(), Vec::new(), Vec::new());
            for q in 0..=sp.z {
                let (nq, tq, cq) = self.population(y, s, q);
                ns.push(nq);
                ts.push(tq);
                cs.push(cq);
            }
            carry.push(cs);
            charge += ns
                .iter()
                .enumerate()
                .map(|(q, v)| q as f64 * v)
                .sum::<f64>();
            n.push(ns);
            t.push(ts);
        }
        let compensation = match compensation {
            Some(c) => c,
            None if sw.space_charge => charge / self.electrons,
            None => self.fixed_compensation,
        };
        let well = self.well(compensation);
        let depth = well.depth_v();
        let beam_area = std::f64::consts::PI * self.beam_radius_m * self.beam_radius_m;
        let mut overlap = Vec::new();
        let mut area = Vec::new();
        let mut mean_phi = Vec::new();
        for (s, sp) in self.species.iter().enumerate() {
            let mut o = vec![1.0; sp.z + 1];
            let mut a = vec![beam_area; sp.z + 1];
            let mut m = vec![0.0; sp.z + 1];
            for q in 1..=sp.z {
                let cloud = well.cloud(q as f64, t[s][q]);
                if sw.overlap {
                    o[q] = cloud.overlap;
                    a[q] = cloud.area_m2;
                }
                m[q] = cloud.mean_inside_potential_v;
            }
            overlap.push(o);
            area.push(a);
            mean_phi.push(m);
        }
        let mut d = Derived {
            compensation,
            well_depth_v: depth,
            n,
            t,
            carry,
            overlap,
            area,
            mean_phi,
            collisions: Vec::new(),
            exchange: Vec::new(),
            axial: Vec::new(),
            radial: Vec::new(),
        };
        let (collisions, exchange) = self.pair_terms(&d);
        d.collisions = collisions;
        d.exchange = exchange;
        let (axial, radial) = self.escape_rates(&d);
        d.axial = axial;
        d.radial = radial;
        d
    }

    /// Escape rates over the axial and radial barriers (s⁻¹) for every population.
    fn escape_rates(&self, d: &Derived) -> (Vec<Vec<f64>>, Vec<Vec<f64>>) {
        let mut axial = Vec::new();
        let mut radial = Vec::new();
        for (s, sp) in self.species.iter().enumerate() {
            let mut ax = vec![0.0; sp.z + 1];
            let mut rad = vec![0.0; sp.z + 1];
            if self.switches.escape {
                let speed = |q: usize| mean_ion_speed_m_s(d.t[s][q], sp.mass_u);
                // Neutrals are not held: they cross the trap at their mean speed.
                ax[0] = speed(0) / self.length_m;
                for q in 1..=sp.z {
                    if d.n[s][q] <= 0.0 {
                        continue;
                    }
                    let nu_i = d.collisions[s][q];
                    let tq = d.t[s][q];
                    let v = speed(q);
                    ax[q] = escape_rate_per_s(
                        nu_i,
                        q as f64 * self.axial_barrier_v / tq,
                        v / self.length_m,
                    );
                    rad[q] = escape_rate_per_s(
                        nu_i,
                        q as f64 * d.well_depth_v / tq,
                        v / self.drift_tube_radius_m,
                    );
                }
            }
            axial.push(ax);
            radial.push(rad);
        }
        (axial, radial)
    }

    /// Density (cm⁻³) of population b seen by a: N_b over the larger of the two clouds.
    fn pair_density_cm3(&self, d: &Derived, a: (usize, usize), b: (usize, usize)) -> f64 {
        let area = d.area[a.0][a.1].max(d.area[b.0][b.1]);
        d.n[b.0][b.1] / (self.length_m * area) * 1e-6
    }

    fn cloud(&self, d: &Derived, a: (usize, usize), b: (usize, usize)) -> IonCloud {
        IonCloud::new(
            a.1 as f64,
            self.species[a.0].mass_u,
            self.pair_density_cm3(d, b, a),
            d.t[a.0][a.1],
        )
    }

    /// One pass over every pair of resolvable populations: each population's total
    /// collision rate (for escape) and its energy exchange with all others. Pairs share
    /// one Coulomb logarithm; populations at or below the regularisation level take no part.
    fn pair_terms(&self, d: &Derived) -> (Vec<Vec<f64>>, Vec<Vec<f64>>) {
        let zeros =
            || -> Vec<Vec<f64>> { self.species.iter().map(|sp| vec![0.0; sp.z + 1]).collect() };
        let (mut nu, mut du) = (zeros(), zeros());
        let sw = self.switches;
        if !(sw.escape || sw.exchange) {
            return (nu, du);
        }
        let active: Vec<(usize, usize)> = self
            .species
            .iter()
            .enumerate()
            .flat_map(|(s, sp)| (1..=sp.z).map(move |q| (s, q)))
            .filter(|&(s, q)| d.n[s][q] > self.negligible())
            .collect();
        for (i, &a) in active.iter().enumerate() {
            for &b in &active[i..] {
                let (nu_a, nu_b, flow) = self.pair(d, a, b);
                nu[a.0][a.1] += nu_a;
                nu[b.0][b.1] += nu_b;
                du[a.0][a.1] += flow;
                du[b.0][b.1] -= flow;
            }
        }
        (nu, du)
    }

    /// One pair's terms: a's collision rate with b, b's with a (0 for a = b), and the
    /// energy flow d(N kT)/dt from b into a. Pairs share one Coulomb logarithm; the flow is
    /// written once for the pair so that exchange conserves energy exactly.
    fn pair(&self, d: &Derived, a: (usize, usize), b: (usize, usize)) -> (f64, f64, f64) {
        let ca = self.cloud(d, a, b);
        let cb = self.cloud(d, b, a);
        let log = ion_ion_coulomb_log(&ca, &cb);
        let (ma, mb) = (self.species[a.0].mass_u, self.species[b.0].mass_u);
        let nu_a = ion_collision_rate_per_s(
            ca.charge,
            ma,
            ca.temperature_ev,
            cb.charge,
            cb.density_cm3,
            log,
        );
        if a == b {
            return (nu_a, 0.0, 0.0);
        }
        let nu_b = ion_collision_rate_per_s(
            cb.charge,
            mb,
            cb.temperature_ev,
            ca.charge,
            ca.density_cm3,
            log,
        );
        let rate = energy_exchange_rate_per_s(&ca, &cb, log) * d.n[a.0][a.1];
        let flow = rate * (cb.temperature_ev - ca.temperature_ev);
        (nu_a, nu_b, flow)
    }

    /// `base` with population `p` taken from state `y` at the base's compensation: its N,
    /// T and cloud, the pair terms it takes part in, and every escape rate (which depend on
    /// the collision rates). O(populations) instead of the O(populations²) of a full
    /// [`Self::derive`].
    fn derive_changed(&self, base: &Derived, y: &[f64], p: (usize, usize)) -> Derived {
        let mut d = base.clone();
        let (s, q) = p;
        let (n, t, carry) = self.population(y, s, q);
        let was_active = q > 0 && base.n[s][q] > self.negligible();
        // Remove p's old pair terms (with the base values)…
        let sw = self.switches;
        let pairs = sw.escape || sw.exchange;
        let others: Vec<(usize, usize)> = if pairs && q > 0 {
            self.species
                .iter()
                .enumerate()
                .flat_map(|(s2, sp)| (1..=sp.z).map(move |q2| (s2, q2)))
                .filter(|&b| b != p && base.n[b.0][b.1] > self.negligible())
                .collect()
        } else {
            Vec::new()
        };
        if was_active && pairs {
            for &b in others.iter().chain(std::iter::once(&p)) {
                let (nu_a, nu_b, flow) = self.pair(base, p, b);
                d.collisions[s][q] -= nu_a;
                d.collisions[b.0][b.1] -= nu_b;
                d.exchange[s][q] -= flow;
                d.exchange[b.0][b.1] += flow;
            }
        }
        // …take the new state of p…
        d.n[s][q] = n;
        d.t[s][q] = t;
        d.carry[s][q] = carry;
        if q > 0 {
            let cloud = self.well(base.compensation).cloud(q as f64, t);
            if sw.overlap {
                d.overlap[s][q] = cloud.overlap;
                d.area[s][q] = cloud.area_m2;
            }
            d.mean_phi[s][q] = cloud.mean_inside_potential_v;
        }
        // …and add its new pair terms. The base sums are kept, so the change is exact up
        // to round-off in the terms of p alone.
        if q > 0 && n > self.negligible() && pairs {
            let base_view = &d;
            let mut adds = Vec::with_capacity(others.len() + 1);
            for &b in others.iter().chain(std::iter::once(&p)) {
                adds.push((b, self.pair(base_view, p, b)));
            }
            for (b, (nu_a, nu_b, flow)) in adds {
                d.collisions[s][q] += nu_a;
                d.collisions[b.0][b.1] += nu_b;
                d.exchange[s][q] += flow;
                d.exchange[b.0][b.1] -= flow;
            }
        }
        let (axial, radial) = self.escape_rates(&d);
        d.axial = axial;
        d.radial = radial;
        d
    }

    /// The right-hand side with its diagnostics.
    pub(crate) fn rhs_with(&self, f: &mut [f64], d: &Derived) {
        f.iter_mut().for_each(|v| *v = 0.0);
        let sw = self.switches;
        let t_gas = self.gas_temperature_ev;
        let (i_fed, i_esc, i_heat, i_ion, i_out) = (
            self.total_index(FED),
            self.total_index(ESCAPED),
            self.total_index(HEAT_IN),
            self.total_index(IONIZATION_HEAT_IN),
            self.total_index(ENERGY_OUT),
        );
        for (s, sp) in self.species.iter().enumerate() {
            for q in 0..=sp.z {
                let n = d.n[s][q];
                let (tq, tc) = (d.t[s][q], d.carry[s][q]);
                let (ni, ui) = (self.n_index(s, q), self.u_index(s, q));
                if n > 0.0 {
                    let ov = d.overlap[s][q];
                    // Electron-impact ionization, carrying the thermal content up.
                    for (to, rate) in &sp.impact[q] {
                        let flux = rate * ov * n;
                        f[ni] -= flux;
                        f[self.n_index(s, *to)] += flux;
                        f[ui] -= flux * tc;
                        let mut u_in = flux * tc;
                        if sw.ionization_heating && q > 0 {
                            let gain = flux * d.mean_phi[s][q] * (*to - q) as f64;
                            u_in += 2.0 / 3.0 * gain;
                            f[i_ion] += gain;
                        }
                        f[self.u_index(s, *to)] += u_in;
                    }
                    // Recombination and charge exchange, one step down.
                    if q > 0 {
                        let cx = sp.charge_exchange[q] * (tq / sp.cx_reference_ev).sqrt();
                        let flux = (sp.recombination[q] * ov + cx) * n;
                        f[ni] -= flux;
                        f[self.n_index(s, q - 1)] += flux;
                        f[ui] -= flux * tc;
                        f[self.u_index(s, q - 1)] += flux * tc;
                    }
                    // Beam heating inside the beam.
                    if sw.heating && q > 0 {
                        let w = ov * sp.heating_ev_per_s[q] * n;
                        f[ui] += 2.0 / 3.0 * w;
                        f[i_heat] += w;
                    }
                    // Escape, each ion taking qV + T (neutrals their own 3T/2).
                    let (ax, rad) = (d.axial[s][q], d.radial[s][q]);
                    if ax + rad > 0.0 {
                        let out = (ax + rad) * n;
                        let energy = if q == 0 {
                            1.5 * tc * out
                        } else {
                            let qf = q as f64;
                            ax * n * escape_energy_ev(qf * self.axial_barrier_v, tq)
                                + rad * n * escape_energy_ev(qf * d.well_depth_v, tq)
                        };
                        f[ni] -= out;
                        f[ui] -= 2.0 / 3.0 * energy;
                        f[i_esc] += out;
                        f[i_out] += energy;
                    }
                }
                // Energy exchange with every other population.
                if sw.exchange {
                    f[ui] += d.exchange[s][q];
                }
            }
            // New ions from the fed and residual gases, at the gas temperature.
            for (q, &feed) in sp.feed_per_s.iter().enumerate() {
                if feed > 0.0 {
                    f[self.n_index(s, q)] += feed;
                    f[self.u_index(s, q)] += feed * t_gas;
                    f[i_fed] += feed;
                    f[self.total_index(FEED_ENERGY_IN)] += 1.5 * feed * t_gas;
                }
            }
        }
    }

    /// Thermal energy (3/2)ΣU of all populations (eV).
    pub(crate) fn thermal_energy(&self, y: &[f64]) -> f64 {
        let mut w = 0.0;
        for (s, sp) in self.species.iter().enumerate() {
            for q in 0..=sp.z {
                w += 1.5 * y[self.u_index(s, q)];
            }
        }
        w
    }
}

impl StiffSystem for TrapSystem {
    fn dim(&self) -> usize {
        self.dim
    }

    fn rhs(&self, y: &[f64], f: &mut [f64]) {
        let d = self.derive(y);
        self.rhs_with(f, &d);
    }

    /// See [`TrapSystem::population_jacobian`] and [`TrapSystem::conserve_rows`].
    fn jacobian(&self, y: &[f64], scale: &[f64], jac: &mut Array2<f64>) {
        self.population_jacobian(y, scale, jac);
        self.conserve_rows(jac);
    }
}

impl TrapSystem {
    /// Forward differences taken cheaply: the state enters the rates through each
    /// population's own (N, T) and through the compensation c = Σ q N / N_e alone, so
    /// J = ∂f/∂y|_c + ∂f/∂c · ∂c/∂y. Each column of the first term changes one population
    /// ([`Self::derive_changed`], O(n) work instead of a whole right-hand side); the
    /// second is one difference in c. The running totals feed nothing back (zero columns).
    /// Agrees with the plain forward difference of the whole right-hand side to its own
    /// truncation error (tested).
    pub(crate) fn population_jacobian(&self, y: &[f64], scale: &[f64], jac: &mut Array2<f64>) {
        jac.fill(0.0);
        let n = self.dim;
        let base = self.derive(y);
        let mut f0 = vec![0.0; n];
        self.rhs_with(&mut f0, &base);
        let mut fp = vec![0.0; n];
        let mut yp = y.to_vec();
        for (s, sp) in self.species.iter().enumerate() {
            for q in 0..=sp.z {
                for j in [self.n_index(s, q), self.u_index(s, q)] {
                    let h = f64::EPSILON.sqrt() * y[j].abs().max(scale[j]).max(f64::MIN_POSITIVE);
                    yp[j] = y[j] + h;
                    let h = yp[j] - y[j];
                    let d = self.derive_changed(&base, &yp, (s, q));
                    self.rhs_with(&mut fp, &d);
                    for i in 0..n {
                        jac[[i, j]] = (fp[i] - f0[i]) / h;
                    }
                    yp[j] = y[j];
                }
            }
        }
        if self.switches.space_charge {
            let c = base.compensation;
            let dc = f64::EPSILON.sqrt() * c.abs().max(1e-6);
            let d = self.derive_with(y, Some(c + dc));
            self.rhs_with(&mut fp, &d);
            for (s, sp) in self.species.iter().enumerate() {
                for q in 1..=sp.z {
                    let j = self.n_index(s, q);
                    if y[j] < 0.0 {
                        continue; // N enters as max(N, 0)
                    }
                    let dcdn = q as f64 / self.electrons;
                    for i in 0..n {
                        jac[[i, j]] += (fp[i] - f0[i]) / dc * dcdn;
                    }
                }
            }
        }
    }

    /// The rows of the running totals of escaped particles and escaped energy, rewritten so
    /// that the Jacobian keeps the model's two conservation laws exactly (particles:
    /// ΣN + escaped − fed; energy: (3/2)ΣU + out − in). BDF's Newton steps with an
    /// exact-invariant Jacobian preserve linear invariants, so the bookkeeping balances to
    /// round-off instead of to the difference error. Those rows feed nothing back, so the
    /// rest of the solve is unchanged.
    fn conserve_rows(&self, jac: &mut Array2<f64>) {
        let n_rows: Vec<usize> = (0..self.species.len())
            .flat_map(|s| (0..=self.species[s].z).map(move |q| (s, q)))
            .map(|(s, q)| self.n_index(s, q))
            .collect();
        let u_rows: Vec<usize> = (0..self.species.len())
            .flat_map(|s| (0..=self.species[s].z).map(move |q| (s, q)))
            .map(|(s, q)| self.u_index(s, q))
            .collect();
        let (esc, fed) = (self.total_index(ESCAPED), self.total_index(FED));
        let out = self.total_index(ENERGY_OUT);
        let ins = [HEAT_IN, IONIZATION_HEAT_IN, FEED_ENERGY_IN].map(|k| self.total_index(k));
        for j in 0..self.dim {
            let particles: f64 = n_rows.iter().map(|&i| jac[[i, j]]).sum::<f64>() - jac[[fed, j]];
            jac[[esc, j]] = -particles;
            let energy: f64 = 1.5 * u_rows.iter().map(|&i| jac[[i, j]]).sum::<f64>()
                - ins.iter().map(|&i| jac[[i, j]]).sum::<f64>();
            jac[[out, j]] = -energy;
        }
    }
}

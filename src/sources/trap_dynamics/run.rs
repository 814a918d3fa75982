//! The result of a dynamic evolution: per species and charge, particles, temperatures,
//! escape fluxes and overlaps over time; compensation and well depth; the bookkeeping.

use ndarray::{Array1, Array2};

use super::steady::SteadyMethod;
use super::system::{
    TrapSystem, ENERGY_OUT, ESCAPED, FED, FEED_ENERGY_IN, HEAT_IN, IONIZATION_HEAT_IN,
};

/// One species over time (arrays `[times, Z+1]`).
#[derive(Clone, Debug)]
pub struct SpeciesHistory {
    /// "Kr" for the natural mix, "84Kr" for one isotope.
    pub label: String,
    pub z: u32,
    pub mass_u: f64,
    /// Particles in the trap (charge 0 = neutral atoms in the beam).
    pub ions: Array2<f64>,
    /// kT (eV); the initial temperature where a population is empty.
    pub temperatures_ev: Array2<f64>,
    /// Particles leaving per second over both barriers (ions/s).
    pub escape_per_s: Array2<f64>,
    /// Overlap of each cloud with the beam (0…1).
    pub overlap: Array2<f64>,
}

impl SpeciesHistory {
    /// Charge-state fractions of the particles present at each time (rows sum to 1, or 0
    /// when nothing is left).
    pub fn fractions(&self) -> Array2<f64> {
        let mut f = self.ions.clone();
        for mut row in f.rows_mut() {
            let total: f64 = row.sum();
            if total > 0.0 {
                row.mapv_inplace(|v| v / total);
            }
        }
        f
    }
}

/// Particle and energy accounts at each time. For a steady state (one row at t = ∞) the
/// accounts are rates: `fed`, `escaped` in particles/s, `energy_in_ev`, `energy_out_ev` in
/// eV/s, and the balances compare inflow with outflow.
#[derive(Clone, Debug)]
pub struct Bookkeeping {
    /// Particles injected at t = 0.
    pub initial_particles: f64,
    /// Ions made from the fed gases since t = 0.
    pub fed: Array1<f64>,
    /// Particles escaped since t = 0.
    pub escaped: Array1<f64>,
    /// Particles in the trap.
    pub trapped: Array1<f64>,
    /// Thermal energy (eV) brought in by beam heating, ionization heating and the feed.
    pub energy_in_ev: Array1<f64>,
    /// Thermal energy (eV) carried out by escaping particles.
    pub energy_out_ev: Array1<f64>,
    /// Thermal energy (eV) of the trapped particles.
    pub thermal_energy_ev: Array1<f64>,
    /// Largest |initial + fed − escaped − trapped| relative to the particles handled.
    pub particle_balance: f64,
    /// Largest |W(0) + in − out − W(t)| relative to the energy handled.
    pub energy_balance: f64,
}

/// A dynamic evolution of all species in a trap.
#[derive(Clone, Debug)]
pub struct DynamicRun {
    pub times_s: Vec<f64>,
    pub species: Vec<SpeciesHistory>,
    /// Trapped positive charge over the electrons' charge.
    pub compensation: Array1<f64>,
    /// Radial well depth (V) from the axis to the drift tube.
    pub well_depth_v: Array1<f64>,
    /// Electrons in the trap, N_e = IL/(ev).
    pub electrons_in_trap: f64,
    pub bookkeeping: Bookkeeping,
    /// How a steady state was found (None for an evolution).
    pub steady_method: Option<SteadyMethod>,
}

impl DynamicRun {
    pub(crate) fn from_states(system: &TrapSystem, times_s: &[f64], y: &Array2<f64>) -> Self {
        let nt = times_s.len();
        let mut species: Vec<SpeciesHistory> = system
            .species
            .iter()
            .map(|sp| SpeciesHistory {
                label: sp.label.clone(),
                z: sp.z as u32,
                mass_u: sp.mass_u,
                ions: Array2::zeros((nt, sp.z + 1)),
                temperatures_ev: Array2::zeros((nt, sp.z + 1)),
                escape_per_s: Array2::zeros((nt, sp.z + 1)),
                overlap: Array2::zeros((nt, sp.z + 1)),
            })
            .collect();
        let mut compensation = Array1::zeros(nt);
        let mut well = Array1::zeros(nt);
        let total = |k: usize, r: usize| y[[r, system.total_index(k)]];
        let mut book = Bookkeeping {
            initial_particles: system.species.iter().map(|s| s.initial_atoms).sum(),
            fed: Array1::zeros(nt),
            escaped: Array1::zeros(nt),
            trapped: Array1::zeros(nt),
            energy_in_ev: Array1::zeros(nt),
            energy_out_ev: Array1::zeros(nt),
            thermal_energy_ev: Array1::zeros(nt),
            particle_balance: 0.0,
            energy_balance: 0.0,
        };
        let w0 = system.thermal_energy(&system.initial_state());
        for r in 0..nt {
            let row: Vec<f64> = y.row(r).to_vec();
            let d = system.derive(&row);
            compensation[r] = d.compensation;
            well[r] = d.well_depth_v;
            // The balance uses the solver's own values (round-off may leave them a hair
            // below zero); the reported populations are clipped at zero.
            let mut trapped = 0.0;
            for (s, h) in species.iter_mut().enumerate() {
                for q in 0..=system.species[s].z {
                    let n = d.n[s][q];
                    trapped += row[system.n_index(s, q)];
                    h.ions[[r, q]] = n;
                    h.temperatures_ev[[r, q]] = d.t[s][q];
                    h.escape_per_s[[r, q]] = (d.axial[s][q] + d.radial[s][q]) * n;
                    h.overlap[[r, q]] = d.overlap[s][q];
                }
            }
            book.fed[r] = total(FED, r);
            book.escaped[r] = total(ESCAPED, r);
            book.trapped[r] = trapped;
            book.energy_in_ev[r] =
                total(HEAT_IN, r) + total(IONIZATION_HEAT_IN, r) + total(FEED_ENERGY_IN, r);
            book.energy_out_ev[r] = total(ENERGY_OUT, r);
            book.thermal_energy_ev[r] = system.thermal_energy(&row);
            let handled = book.initial_particles + book.fed[r];
            if handled > 0.0 {
                let miss = book.initial_particles + book.fed[r] - book.escaped[r] - trapped;
                book.particle_balance = book.particle_balance.max(miss.abs() / handled);
            }
            let energy = w0 + book.energy_in_ev[r];
            if energy > 0.0 {
                let miss =
                    w0 + book.energy_in_ev[r] - book.energy_out_ev[r] - book.thermal_energy_ev[r];
                book.energy_balance = book.energy_balance.max(miss.abs() / energy);
            }
        }
        DynamicRun {
            times_s: times_s.to_vec(),
            species,
            compensation,
            well_depth_v: well,
            electrons_in_trap: system.electrons,
            bookkeeping: book,
            steady_method: None,
        }
    }

    /// The run of one steady state `y` (time ∞): populations as in an evolution, the
    /// bookkeeping as rates (the running totals' derivatives at `y`).
    pub(crate) fn from_steady_state(system: &TrapSystem, y: &[f64], method: SteadyMethod) -> Self {
        let mut f = vec![0.0; system.dim];
        crate::solve::stiff::StiffSystem::rhs(system, y, &mut f);
        let rows = Array2::from_shape_vec((1, y.len()), y.to_vec())
            .unwrap_or_else(|_| Array2::zeros((1, y.len())));
        let mut run = Self::from_states(system, &[f64::INFINITY], &rows);
        let rate = |k: usize| f[system.total_index(k)];
        let b = &mut run.bookkeeping;
        b.initial_particles = 0.0;
        b.fed[0] = rate(FED);
        b.escaped[0] = rate(ESCAPED);
        b.energy_in_ev[0] = rate(HEAT_IN) + rate(IONIZATION_HEAT_IN) + rate(FEED_ENERGY_IN);
        b.energy_out_ev[0] = rate(ENERGY_OUT);
        let flow = b.fed[0].max(b.escaped[0]);
        b.particle_balance = if flow > 0.0 {
            (b.fed[0] - b.escaped[0]).abs() / flow
        } else {
            0.0
        };
        let energy = b.energy_in_ev[0].max(b.energy_out_ev[0]);
        b.energy_balance = if energy > 0.0 {
            (b.energy_in_ev[0] - b.energy_out_ev[0]).abs() / energy
        } else {
            0.0
        };
        run.steady_method = Some(method);
        run
    }

    /// The model that made this run ("dynamic").
    pub fn model(&self) -> &'static str {
        "dynamic"
    }

    /// The history of one species by label ("Kr", "84Kr").
    pub fn species(&self, label: &str) -> Option<&SpeciesHistory> {
        self.species.iter().find(|s| s.label == label)
    }
}

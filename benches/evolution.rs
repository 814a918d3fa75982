//! Criterion benchmarks of the rate-equation solver on synthetic, physically shaped networks:
//! one element (Z = 18, 36, 54, 92) with 1000 log-spaced output times from 1e-4 to 1 s, and a
//! sweep of Z = 1…92 × 100 beam energies × 200 output times through `evolve_batch`.
//!
//! The networks are invented for timing only (no atomic data): a nearest-neighbour chain
//! whose ionization rates follow the shape of the Lotz formula, rate ∝ ln(E/IE_q)/(E·IE_q)
//! at fixed E, scaled so that the neutral ionizes at 1e9 s⁻¹; ionization energies rise
//! quadratically from 12 eV to 13.6·Z² eV, so at E = 1.1 × the last one the last step runs
//! at ~1 s⁻¹. Recombination rises from 1e-2 to 1e3 s⁻¹ and charge exchange from 1e-1 to
//! 1e2 s⁻¹ with the charge.
//!
//! The `physical` groups time the same problems on the real networks of a 20 keV, 0.5 A,
//! 50 µm electron-beam trap with H2 and N2 residual gas (Lotz, Kim–Pratt, Müller–Salzborn),
//! the case `benches/compare_scipy.py` runs against scipy.
//!
//! The `dynamics` group times the beam trap's ion-dynamics model (krypton with a nitrogen
//! coolant).
//!
//! Run with `cargo bench --bench evolution`. For comparison, scipy's solve_ivp(BDF) needs
//! ~0.5 s for 19 states and 1000 output times (measured while the project was planned;
//! README's performance table has today's figures).

use std::hint::black_box;
use std::time::Duration;

use chargecast::atoms::element_by_z;
use chargecast::network::RateNetwork;
use chargecast::solve::{evolve, evolve_batch, steady_state};
use chargecast::sources::beam_trap::BeamTrap;
use chargecast::sources::electron_beam::ElectronBeam;
use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};

fn ionization_energy_ev(z: usize, q: usize) -> f64 {
    let (first, last) = (12.0, 13.6 * (z * z) as f64);
    let x = if z > 1 {
        q as f64 / (z - 1) as f64
    } else {
        0.0
    };
    first + (last - first) * x * x
}

/// The synthetic chain of element `z` at beam energy `energy_ev` (see module docs).
fn lotz_like_chain(z: usize, energy_ev: f64) -> RateNetwork {
    let mut net = RateNetwork::new(z + 1).expect("z >= 0");
    let shape = |ie: f64| (energy_ev / ie).ln() / (energy_ev * ie);
    let neutral_ie = ionization_energy_ev(z, 0);
    let neutral_shape = shape(neutral_ie).max(1e-300);
    for q in 0..z {
        let ie = ionization_energy_ev(z, q);
        if energy_ev > ie {
            let rate = 1e9 * shape(ie) / neutral_shape * (neutral_ie / ie);
            net.add_rate(q, q + 1, rate).expect("valid rate");
        }
        let frac = (q + 1) as f64 / z as f64;
        let recombination = 1e-2 * 1e5f64.powf(frac);
        let charge_exchange = 1e-1 * 1e3f64.powf(frac);
        net.add_rate(q + 1, q, recombination + charge_exchange)
            .expect("valid rate");
    }
    net
}

fn geomspace(first: f64, last: f64, count: usize) -> Vec<f64> {
    (0..count)
        .map(|i| first * (last / first).powf(i as f64 / (count - 1) as f64))
        .collect()
}

fn neutral(z: usize) -> Vec<f64> {
    let mut v = vec![0.0; z + 1];
    v[0] = 1.0;
    v
}

fn one_element(c: &mut Criterion) {
    let times = geomspace(1e-4, 1.0, 1000);
    let mut group = c.benchmark_group("evolve_1000_times");
    group
        .sample_size(10)
        .warm_up_time(Duration::from_millis(500))
        .measurement_time(Duration::from_secs(2));
    for z in [18, 36, 54, 92] {
        let energy_ev = 1.1 * ionization_energy_ev(z, z - 1);
        let net = lotz_like_chain(z, energy_ev);
        let start = neutral(z);
        group.bench_with_input(BenchmarkId::from_parameter(z), &z, |b, _| {
            b.iter(|| evolve(black_box(&net), black_box(&start), black_box(&times)))
        });
    }
    group.finish();

    let net = lotz_like_chain(92, 1.1 * ionization_energy_ev(92, 91));
    let mut group = c.benchmark_group("steady_state");
    group
        .sample_size(10)
        .warm_up_time(Duration::from_millis(200))
        .measurement_time(Duration::from_secs(1));
    group.bench_function("92", |b| b.iter(|| steady_state(black_box(&net))));
    group.finish();
}

fn sweep(c: &mut Criterion) {
    let times = geomspace(1e-4, 1.0, 200);
    let mut problems = Vec::with_capacity(92 * 100);
    for z in 1..=92 {
        let (low, high) = (
            2.0 * ionization_energy_ev(z, 0),
            1.5 * ionization_energy_ev(z, z - 1),
        );
        for energy_ev in geomspace(low, high, 100) {
            problems.push((lotz_like_chain(z, energy_ev), neutral(z)));
        }
    }
    let mut group = c.benchmark_group("sweep_z1_92_x100_energies_x200_times");
    group
        .sample_size(10)
        .warm_up_time(Duration::from_millis(100))
        .measurement_time(Duration::from_secs(10));
    group.bench_function("evolve_batch", |b| {
        b.iter(|| evolve_batch(black_box(&problems), black_box(&times)))
    });
    group.finish();
}

/// The trap of `benches/compare_scipy.py` at another beam energy.
fn physical_trap(energy_ev: f64) -> BeamTrap {
    let beam = ElectronBeam::with_radius(energy_ev, 0.5, 50e-6).expect("valid beam");
    let gas = [("H2".to_string(), 1e-8), ("N2".to_string(), 1e-9)];
    BeamTrap::new(beam, 0.5, &gas, 100.0).expect("valid trap")
}

fn physical_network(z: i64, energy_ev: f64) -> RateNetwork {
    let element = element_by_z(z).expect("Z in the tables");
    physical_trap(energy_ev)
        .network(element)
        .expect("complete chain")
}

fn physical(c: &mut Criterion) {
    let times = geomspace(1e-4, 1.0, 1000);
    let mut group = c.benchmark_group("physical_evolve_1000_times");
    group
        .sample_size(10)
        .warm_up_time(Duration::from_millis(500))
        .measurement_time(Duration::from_secs(2));
    for z in [18usize, 36, 54, 92] {
        let net = physical_network(z as i64, 20_000.0);
        let start = neutral(z);
        group.bench_with_input(BenchmarkId::from_parameter(z), &z, |b, _| {
            b.iter(|| evolve(black_box(&net), black_box(&start), black_box(&times)))
        });
    }
    group.finish();

    let times = geomspace(1e-4, 1.0, 200);
    let energies = geomspace(500.0, 50_000.0, 100);
    let mut problems = Vec::with_capacity(92 * 100);
    for z in 1..=92usize {
        for energy_ev in &energies {
            problems.push((physical_network(z as i64, *energy_ev), neutral(z)));
        }
    }
    let mut group = c.benchmark_group("physical_sweep_z1_92_x100_energies_x200_times");
    group
        .sample_size(10)
        .warm_up_time(Duration::from_millis(100))
        .measurement_time(Duration::from_secs(20));
    group.bench_function("evolve_batch", |b| {
        b.iter(|| evolve_batch(black_box(&problems), black_box(&times)))
    });
    group.finish();
}

/// The ion-dynamics model: krypton (37 charge states) with a nitrogen coolant fed in
/// (8 charge states), populations and temperatures, every dynamic process on, 0 … 1 s at
/// 300 output times; the case `benches/dynamics_scipy.py` runs against scipy.
fn dynamics(c: &mut Criterion) {
    let beam = ElectronBeam::with_current_density(20_000.0, 0.5, 1000.0).expect("beam");
    let trap = BeamTrap::builder(beam, 0.6)
        .residual_gas_pa(vec![("H2".into(), 1e-9)])
        .model("dynamic")
        .axial_barrier_v(300.0)
        .gas_feed_pa(vec![("N2".into(), 1e-7)])
        .build()
        .expect("trap");
    let times: Vec<f64> = (1..=300).map(|k| k as f64 / 300.0).collect();
    let loads = vec![("Kr".to_string(), 1e8)];
    let mut group = c.benchmark_group("dynamics_kr_with_n_coolant_300_times");
    group
        .sample_size(10)
        .warm_up_time(Duration::from_millis(100))
        .measurement_time(Duration::from_secs(5));
    group.bench_function("evolve", |b| {
        b.iter(|| trap.evolve_dynamic(black_box(&loads), black_box(&times)))
    });
    group.finish();
}

criterion_group!(benches, one_element, sweep, physical, dynamics);
criterion_main!(benches);

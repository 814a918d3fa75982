use chargecast::solve::stiff::last_statistics;
use chargecast::sources::beam_trap::BeamTrap;
use chargecast::sources::electron_beam::ElectronBeam;
use std::time::Instant;

fn main() {
    let beam = ElectronBeam::with_current_density(20_000.0, 0.5, 1000.0).unwrap();
    let trap = BeamTrap::builder(beam, 0.6)
        .residual_gas_pa(vec![("H2".into(), 1e-9)])
        .model("dynamic")
        .axial_barrier_v(300.0)
        .gas_feed_pa(vec![("N2".into(), 1e-7)])
        .build()
        .unwrap();
    let times: Vec<f64> = (1..=300).map(|k| k as f64 / 300.0).collect();
    for _ in 0..2 {
        let t0 = Instant::now();
        let run = trap.evolve_dynamic(&[("Kr".into(), 1e8)], &times).unwrap();
        let dt = t0.elapsed();
        let kr = run.species("Kr").unwrap();
        let f = kr.fractions();
        println!(
            "{:?} {:?} Kr34+ {:.4} kT {:.1} balance {:e} {:e}",
            dt,
            last_statistics(),
            f[[299, 34]],
            kr.temperatures_ev[[299, 34]],
            run.bookkeeping.particle_balance,
            run.bookkeeping.energy_balance
        );
    }
}

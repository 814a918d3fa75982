//! Cancellation and the memory limit. Both are process-wide settings, so these tests run in
//! a test binary of their own and one at a time.

use std::sync::Mutex;
use std::time::Duration;

use chargecast::error::Error;
use chargecast::interrupt;
use chargecast::limits;
use chargecast::network::RateNetwork;
use chargecast::solve::{evolve, evolve_batch};

static SERIAL: Mutex<()> = Mutex::new(());

/// A chain whose evolution over many output times takes many seconds.
fn long_problem() -> (RateNetwork, Vec<f64>, Vec<f64>) {
    let n = 400;
    let mut net = RateNetwork::new(n).unwrap();
    for from in 0..n {
        for to in 0..n {
            if from != to {
                let x = ((from * 7919 + to * 104_729) % 1000) as f64 / 1000.0;
                net.add_rate(from, to, 10f64.powf(6.0 * x - 3.0)).unwrap();
            }
        }
    }
    let mut start = vec![0.0; n];
    start[0] = 1.0;
    let times = (0..20_000)
        .map(|i| 1e-6 * 1e9f64.powf(i as f64 / 19_999.0))
        .collect();
    (net, start, times)
}

#[test]
fn cancel_from_another_thread_stops_an_evolution() {
    let _serial = SERIAL.lock().unwrap_or_else(|e| e.into_inner());
    interrupt::reset();
    let (net, start, times) = long_problem();
    let canceller = std::thread::spawn(|| {
        std::thread::sleep(Duration::from_millis(300));
        interrupt::cancel();
    });
    assert_eq!(
        evolve(&net, &start, &times).unwrap_err(),
        Error::Interrupted
    );
    canceller.join().unwrap();
    interrupt::reset();
    assert!(evolve(&net, &start, &times[..3]).is_ok());
}

#[test]
fn a_poll_hook_stops_a_parallel_batch() {
    let _serial = SERIAL.lock().unwrap_or_else(|e| e.into_inner());
    interrupt::reset();
    let (net, start, times) = long_problem();
    let problems = vec![(net.clone(), start.clone()), (net, start)];
    let began = std::time::Instant::now();
    let results = interrupt::with_poll_hook(
        move || began.elapsed() > Duration::from_millis(300),
        || evolve_batch(&problems, &times),
    );
    assert!(results.iter().all(|r| r == &Err(Error::Interrupted)));
    interrupt::reset();
    // The hook is gone once the call has returned.
    assert_eq!(interrupt::check(), Ok(()));
}

#[test]
fn panics_in_polled_work_reach_the_caller() {
    let _serial = SERIAL.lock().unwrap_or_else(|e| e.into_inner());
    let caught = std::panic::catch_unwind(|| {
        interrupt::with_poll_hook(|| false, || interrupt::run_polled(|| panic!("boom")))
    });
    assert!(caught.is_err());
}

#[test]
fn requests_beyond_the_memory_limit_are_refused_with_estimate_and_limit() {
    let _serial = SERIAL.lock().unwrap_or_else(|e| e.into_inner());
    let mut net = RateNetwork::new(10).unwrap();
    net.add_rate(0, 1, 1.0).unwrap();
    let mut start = vec![0.0; 10];
    start[0] = 1.0;
    let times: Vec<f64> = (0..20_000).map(|i| i as f64 * 1e-3).collect();
    let default = limits::memory_limit_bytes();
    limits::set_memory_limit_bytes(1 << 20).unwrap();
    let err = evolve(&net, &start, &times).unwrap_err();
    let batch = evolve_batch(&[(net.clone(), start.clone())], &times);
    limits::set_memory_limit_bytes(default).unwrap();
    match &err {
        Error::MemoryLimit {
            estimate_bytes,
            limit_bytes,
            ..
        } => {
            assert_eq!(*limit_bytes, 1 << 20);
            assert!(*estimate_bytes >= 20_000 * 10 * 8);
        }
        other => panic!("{other}"),
    }
    assert!(err.to_string().contains("1.049 MB"), "{err}");
    assert!(matches!(batch[0], Err(Error::MemoryLimit { .. })));
    assert!(evolve(&net, &start, &times).is_ok());
}

/// An argon trap running the ion-dynamics model.
fn dynamic_trap() -> chargecast::sources::beam_trap::BeamTrap {
    use chargecast::sources::beam_trap::BeamTrap;
    use chargecast::sources::electron_beam::ElectronBeam;
    let beam = ElectronBeam::with_current_density(6_000.0, 0.2, 400.0).unwrap();
    BeamTrap::builder(beam, 0.6)
        .residual_gas_pa(vec![("H2".into(), 1e-8)])
        .model("dynamic")
        .build()
        .unwrap()
}

#[test]
fn a_poll_hook_stops_the_stiff_solve_between_steps() {
    let _serial = SERIAL.lock().unwrap_or_else(|e| e.into_inner());
    interrupt::reset();
    let trap = dynamic_trap();
    let loads = vec![("Ar".to_string(), 1e7)];
    let mut calls = 0;
    let out = interrupt::with_poll_hook(
        move || {
            calls += 1;
            calls > 5
        },
        || trap.evolve_dynamic(&loads, &[1.0]),
    );
    assert_eq!(out.unwrap_err(), Error::Interrupted);
    interrupt::reset();
}

#[test]
fn the_memory_limit_bounds_a_dynamic_run() {
    let _serial = SERIAL.lock().unwrap_or_else(|e| e.into_inner());
    let default = limits::memory_limit_bytes();
    limits::set_memory_limit_bytes(1 << 20).unwrap();
    let times: Vec<f64> = (1..=20_000).map(|k| k as f64 * 1e-6).collect();
    let out = dynamic_trap().evolve_dynamic(&[("Ar".to_string(), 1e7)], &times);
    limits::set_memory_limit_bytes(default).unwrap();
    assert!(matches!(out, Err(Error::MemoryLimit { .. })), "{out:?}");
}

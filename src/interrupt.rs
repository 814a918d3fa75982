//! Cooperative cancellation of long computations (Ctrl-C from an embedding program).
//!
//! Two pieces, both free of any binding type:
//! * a process-wide cancellation flag. [`cancel`] sets it; every long loop (solver steps,
//!   batches, energy × time maps) calls [`check`] between units of work and stops with
//!   [`Error::Interrupted`] once it is set. The flag is process-wide, not per thread, so that
//!   the worker threads of a parallel loop stop together with the thread that noticed the
//!   interrupt. Whoever set it clears it with [`reset`] once its call has returned.
//! * a per-thread poll hook ([`with_poll_hook`]): a callback that asks the embedding program
//!   whether it wants to stop (the Python binding checks for pending signals, at most every
//!   0.1 s). [`check`] calls it on the thread that installed it; a `true` sets the flag.
//!
//! Work handed to a thread pool blocks the calling thread, so the hook would never run while
//! the pool is busy. [`run_polled`] therefore runs such work on a helper thread while the
//! calling thread keeps polling its hook, every [`POLL_INTERVAL`].

use std::cell::RefCell;
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::mpsc;
use std::time::Duration;

use crate::error::{Error, Result};

static CANCELLED: AtomicBool = AtomicBool::new(false);

/// How often [`run_polled`] asks the hook while parallel work is running.
pub const POLL_INTERVAL: Duration = Duration::from_millis(50);

type Hook = Box<dyn FnMut() -> bool>;

thread_local! {
    static HOOK: RefCell<Option<Hook>> = const { RefCell::new(None) };
}

/// Ask every running computation to stop at its next [`check`].
pub fn cancel() {
    CANCELLED.store(true, Ordering::SeqCst);
}

/// Clear the cancellation flag (after the interrupted call has returned).
pub fn reset() {
    CANCELLED.store(false, Ordering::SeqCst);
}

/// Whether [`cancel`] was called and not yet [`reset`].
pub fn is_cancelled() -> bool {
    CANCELLED.load(Ordering::Relaxed)
}

/// Ask this thread's poll hook (if any) whether to stop; a `true` sets the flag.
fn poll_hook() {
    // The hook is taken out while it runs: it may call back into code that checks (a signal
    // handler running a computation), which then finds no hook instead of a borrowed one.
    let taken = HOOK.with(|h| h.try_borrow_mut().ok().and_then(|mut h| h.take()));
    if let Some(mut hook) = taken {
        if hook() {
            cancel();
        }
        HOOK.with(|h| {
            if let Ok(mut slot) = h.try_borrow_mut() {
                if slot.is_none() {
                    *slot = Some(hook);
                }
            }
        });
    }
}

/// `Err(Error::Interrupted)` once a stop was requested; cheap enough to call every step
/// (an atomic load, plus this thread's hook, which throttles itself).
pub fn check() -> Result<()> {
    poll_hook();
    if is_cancelled() {
        Err(Error::Interrupted)
    } else {
        Ok(())
    }
}

/// Run `work` with `hook` installed as this thread's poll hook, restoring the previous one
/// afterwards (calls nest).
pub fn with_poll_hook<T>(hook: impl FnMut() -> bool + 'static, work: impl FnOnce() -> T) -> T {
    struct Restore(Option<Hook>);
    impl Drop for Restore {
        fn drop(&mut self) {
            let previous = self.0.take();
            HOOK.with(|h| *h.borrow_mut() = previous);
        }
    }
    let previous = HOOK.with(|h| h.borrow_mut().replace(Box::new(hook)));
    let _restore = Restore(previous);
    work()
}

/// Run `work` (typically a parallel loop) and keep polling this thread's hook while it
/// runs; without a hook `work` simply runs here. Panics in `work` are passed on.
pub fn run_polled<T: Send>(work: impl FnOnce() -> T + Send) -> T {
    let has_hook = HOOK.with(|h| h.try_borrow().map(|h| h.is_some()).unwrap_or(false));
    if !has_hook {
        return work();
    }
    std::thread::scope(|scope| {
        let (done_tx, done_rx) = mpsc::channel::<()>();
        let handle = scope.spawn(move || {
            let out = work();
            let _ = done_tx.send(());
            out
        });
        // Returns on completion, or once the worker panicked and dropped the sender.
        while let Err(mpsc::RecvTimeoutError::Timeout) = done_rx.recv_timeout(POLL_INTERVAL) {
            poll_hook();
        }
        match handle.join() {
            Ok(out) => out,
            Err(panic) => std::panic::resume_unwind(panic),
        }
    })
}

// Tests that set the process-wide flag live in tests/solver_interrupt.rs, a process of their
// own, so that they cannot interrupt unrelated unit tests running alongside.

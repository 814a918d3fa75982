//! Values computed once per key per process and shared between threads.
//!
//! Vacancy cascades and DR resonance lists depend on the ion alone and are costly to build,
//! so each is made once. The map holds one cell per key: threads that ask for a key still
//! being computed wait for it instead of computing it again (eight threads used to rebuild
//! uranium's cascade eight times). A poisoned lock is taken over, since a cell is filled
//! only by a completed computation.

use std::collections::HashMap;
use std::hash::Hash;
use std::sync::{Arc, Mutex, OnceLock};

/// A process-wide cache: declare it as a `static` and fill it with [`get_or_compute`].
pub type Memo<K, V> = OnceLock<Mutex<HashMap<K, Arc<OnceLock<V>>>>>;

/// The value of `key` in `memo`, computed by `compute` on the first request only.
pub fn get_or_compute<K: Eq + Hash, V: Clone>(
    memo: &'static Memo<K, V>,
    key: K,
    compute: impl FnOnce() -> V,
) -> V {
    let cell = {
        let mut map = memo
            .get_or_init(|| Mutex::new(HashMap::new()))
            .lock()
            .unwrap_or_else(|p| p.into_inner());
        Arc::clone(map.entry(key).or_default())
    };
    cell.get_or_init(compute).clone()
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::sync::atomic::{AtomicUsize, Ordering};

    #[test]
    fn each_key_is_computed_once_across_threads() {
        static MEMO: Memo<u32, Arc<u32>> = OnceLock::new();
        static CALLS: AtomicUsize = AtomicUsize::new(0);
        let threads: Vec<_> = (0..8)
            .map(|i| {
                std::thread::spawn(move || {
                    get_or_compute(&MEMO, i % 2, || {
                        CALLS.fetch_add(1, Ordering::SeqCst);
                        std::thread::sleep(std::time::Duration::from_millis(20));
                        Arc::new(i % 2 + 10)
                    })
                })
            })
            .collect();
        let values: Vec<u32> = threads.into_iter().map(|t| *t.join().unwrap()).collect();
        assert!(values
            .iter()
            .enumerate()
            .all(|(i, v)| *v == i as u32 % 2 + 10));
        assert_eq!(CALLS.load(Ordering::SeqCst), 2);
    }
}

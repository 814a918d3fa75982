//! The size model's one setting: how much memory a single call may plan to use, and
//! fallible allocation of the big buffers.
//!
//! Every entry point that can grow with its input (evolutions over many times, batches,
//! energy × time maps, general rate networks) estimates the bytes of its result plus its
//! working set before allocating, and refuses beyond [`memory_limit_bytes`] with
//! [`Error::MemoryLimit`], which names the estimate and the limit. The limit is
//! process-wide, [`DEFAULT_MEMORY_LIMIT_BYTES`] (2 GiB) unless raised with
//! [`set_memory_limit_bytes`]. Buffers are then reserved fallibly ([`try_vec`],
//! [`try_zeros`]), so that an allocation the machine cannot satisfy is an
//! [`Error::AllocationFailed`] instead of an abort of the process.

use std::sync::atomic::{AtomicU64, Ordering};

use ndarray::Array2;

use crate::error::{Error, Result};

/// Default limit per call: 2 GiB.
pub const DEFAULT_MEMORY_LIMIT_BYTES: u64 = 2 << 30;
/// The smallest limit accepted: 1 MiB (below that ordinary calls would fail).
pub const MIN_MEMORY_LIMIT_BYTES: u64 = 1 << 20;

static LIMIT: AtomicU64 = AtomicU64::new(DEFAULT_MEMORY_LIMIT_BYTES);

/// The current limit (bytes) on the estimated memory of one call.
pub fn memory_limit_bytes() -> u64 {
    LIMIT.load(Ordering::Relaxed)
}

/// Set the limit (bytes) on the estimated memory of one call; at least
/// [`MIN_MEMORY_LIMIT_BYTES`].
pub fn set_memory_limit_bytes(limit_bytes: u64) -> Result<()> {
    if limit_bytes < MIN_MEMORY_LIMIT_BYTES {
        return Err(Error::invalid(
            "limit_bytes",
            limit_bytes,
            &format!("must be at least {MIN_MEMORY_LIMIT_BYTES} (1 MiB)"),
        ));
    }
    LIMIT.store(limit_bytes, Ordering::Relaxed);
    Ok(())
}

/// Bytes of `counts` multiplied together times `bytes_each`, saturating at u64::MAX (an
/// estimate that overflows is beyond any limit anyway).
pub fn bytes_for(counts: &[usize], bytes_each: usize) -> u64 {
    counts
        .iter()
        .fold(bytes_each as u64, |acc, &c| acc.saturating_mul(c as u64))
}

/// `Err(Error::MemoryLimit)` if `estimate_bytes` exceeds the limit.
pub fn check_memory(what: &str, estimate_bytes: u64) -> Result<()> {
    let limit_bytes = memory_limit_bytes();
    if estimate_bytes > limit_bytes {
        Err(Error::MemoryLimit {
            what: what.to_string(),
            estimate_bytes,
            limit_bytes,
        })
    } else {
        Ok(())
    }
}

/// A vector of `len` copies of `value`, or an error if the memory cannot be reserved.
pub fn try_vec<T: Clone>(what: &str, len: usize, value: T) -> Result<Vec<T>> {
    let mut v = Vec::new();
    v.try_reserve_exact(len)
        .map_err(|_| Error::AllocationFailed {
            what: what.to_string(),
            bytes: bytes_for(&[len], std::mem::size_of::<T>()),
        })?;
    v.resize(len, value);
    Ok(v)
}

/// A zero matrix of `rows × cols`, or an error if the memory cannot be reserved.
pub fn try_zeros(what: &str, rows: usize, cols: usize) -> Result<Array2<f64>> {
    let len = rows
        .checked_mul(cols)
        .ok_or_else(|| Error::AllocationFailed {
            what: what.to_string(),
            bytes: u64::MAX,
        })?;
    let data = try_vec(what, len, 0.0)?;
    Array2::from_shape_vec((rows, cols), data).map_err(|e| Error::invalid(what, e, "shape"))
}

pub use crate::error::human_bytes;

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn estimates_saturate_and_messages_name_estimate_and_limit() {
        assert_eq!(bytes_for(&[10, 3], 8), 240);
        assert_eq!(bytes_for(&[usize::MAX, usize::MAX], 8), u64::MAX);
        let err = check_memory("the result", u64::MAX).unwrap_err();
        let text = err.to_string();
        assert!(text.contains("the result"), "{text}");
        assert!(text.contains(&memory_limit_bytes().to_string()), "{text}");
        assert!(check_memory("x", 1000).is_ok());
        assert!(set_memory_limit_bytes(10).is_err());
        assert_eq!(human_bytes(5_520_000_000), "5.520 GB (5520000000 bytes)");
    }

    #[test]
    fn an_impossible_allocation_is_an_error_not_an_abort() {
        let err = try_vec("a huge buffer", usize::MAX / 8, 0.0f64).unwrap_err();
        assert!(matches!(err, Error::AllocationFailed { .. }), "{err}");
        assert!(try_zeros("grid", usize::MAX, 2).is_err());
        assert_eq!(try_zeros("grid", 2, 3).unwrap().shape(), &[2, 3]);
    }
}

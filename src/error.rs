//! The one error type of the core. Every variant says what was given and what is allowed;
//! the Python binding maps each variant to its own exception class.

use thiserror::Error;

/// Result alias used throughout the crate.
pub type Result<T> = std::result::Result<T, Error>;

#[derive(Debug, Clone, PartialEq, Error)]
pub enum Error {
    /// An element symbol, name or atomic number that is not in the tables.
    #[error("unknown element {given:?}: give a symbol (\"Kr\"), a name (\"krypton\") or an atomic number 1..={max_z}")]
    UnknownElement { given: String, max_z: u32 },

    /// A charge state outside the range that makes sense for this call.
    #[error("charge {charge} is out of range for {symbol} (Z = {z}): allowed 0..={max}")]
    ChargeOutOfRange {
        symbol: String,
        z: u32,
        charge: i64,
        max: u32,
    },

    /// The tables hold no data for this ion (or quantity).
    #[error("no data for {what}: {why}")]
    NoData { what: String, why: String },

    /// A numeric parameter that is NaN, infinite, non-positive or otherwise not allowed.
    #[error("invalid {name} = {value}: {allowed}")]
    InvalidParameter {
        name: String,
        value: String,
        allowed: String,
    },

    /// A residual-gas or target-gas species that is not in the gas table.
    #[error("unknown gas {given:?}: allowed {allowed}")]
    UnknownGas { given: String, allowed: String },

    /// A scenario file that cannot be read or does not follow the schema.
    #[error("{file}: {message}")]
    InvalidScenario { file: String, message: String },

    /// A request whose estimated memory (result and working set) exceeds the limit of one
    /// call (see `limits`).
    #[error(
        "{what} needs about {} of memory (estimated result and working set), more than the limit of {}: use fewer points or raise the limit (set_memory_limit_bytes)",
        human_bytes(*estimate_bytes),
        human_bytes(*limit_bytes)
    )]
    MemoryLimit {
        what: String,
        estimate_bytes: u64,
        limit_bytes: u64,
    },

    /// The machine could not provide memory that was within the limit.
    #[error("could not allocate {} for {what}: not enough free memory on this machine", human_bytes(*bytes))]
    AllocationFailed { what: String, bytes: u64 },

    /// The computation was stopped by a request to cancel it (Ctrl-C; see `interrupt`).
    #[error("interrupted")]
    Interrupted,
}

impl Error {
    /// Shorthand for [`Error::InvalidParameter`].
    pub fn invalid(name: &str, value: impl std::fmt::Display, allowed: &str) -> Self {
        Error::InvalidParameter {
            name: name.to_string(),
            value: value.to_string(),
            allowed: allowed.to_string(),
        }
    }
}

/// Check that `value` is finite and strictly positive.
pub fn require_positive(name: &str, value: f64) -> Result<f64> {
    if value.is_finite() && value > 0.0 {
        Ok(value)
    } else {
        Err(Error::invalid(name, value, "must be a finite number > 0"))
    }
}

/// Check that `value` is finite and not negative.
pub fn require_non_negative(name: &str, value: f64) -> Result<f64> {
    if value.is_finite() && value >= 0.0 {
        Ok(value)
    } else {
        Err(Error::invalid(name, value, "must be a finite number >= 0"))
    }
}

/// Check that every value of a slice is finite and strictly positive.
pub fn require_all_positive(name: &str, values: &[f64]) -> Result<()> {
    match values.iter().find(|v| !(v.is_finite() && **v > 0.0)) {
        None => Ok(()),
        Some(v) => Err(Error::invalid(
            name,
            v,
            "every value must be a finite number > 0",
        )),
    }
}

/// Check that times are finite, non-negative and sorted ascending.
pub fn require_sorted_times(name: &str, times: &[f64]) -> Result<()> {
    if let Some(t) = times.iter().find(|t| !(t.is_finite() && **t >= 0.0)) {
        return Err(Error::invalid(
            name,
            t,
            "every time must be finite and >= 0 s",
        ));
    }
    if let Some(w) = times.windows(2).find(|w| w[1] < w[0]) {
        return Err(Error::invalid(
            name,
            format!("{} after {}", w[1], w[0]),
            "times must be sorted in ascending order",
        ));
    }
    Ok(())
}

/// A byte count for messages: "5.52 GB (5520000000 bytes)".
pub fn human_bytes(bytes: u64) -> String {
    let units = [(1e12, "TB"), (1e9, "GB"), (1e6, "MB"), (1e3, "kB")];
    for (scale, unit) in units {
        if bytes as f64 >= scale {
            return format!("{:.3} {unit} ({bytes} bytes)", bytes as f64 / scale);
        }
    }
    format!("{bytes} bytes")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn positive_check_rejects_nan_zero_and_infinity() {
        assert!(require_positive("energy_ev", f64::NAN).is_err());
        assert!(require_positive("energy_ev", 0.0).is_err());
        assert!(require_positive("energy_ev", f64::INFINITY).is_err());
        assert_eq!(require_positive("energy_ev", 2.0), Ok(2.0));
    }

    #[test]
    fn sorted_times_check_names_the_offending_pair() {
        let err = require_sorted_times("times_s", &[0.0, 2.0, 1.0]).unwrap_err();
        assert!(err.to_string().contains("1 after 2"), "{err}");
    }
}

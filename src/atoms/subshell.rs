//! Subshells (n, l) and configurations written as `[Ar].3d6.4s2`.

use std::fmt;

use crate::error::{Error, Result};

const L_LETTERS: [char; 7] = ['s', 'p', 'd', 'f', 'g', 'h', 'i'];

/// One subshell, identified by its principal and orbital quantum numbers.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct Subshell {
    pub n: u32,
    pub l: u32,
}

impl Subshell {
    pub const fn new(n: u32, l: u32) -> Self {
        Subshell { n, l }
    }

    /// Electrons the subshell holds when full, 2(2l+1).
    pub fn capacity(&self) -> u32 {
        2 * (2 * self.l + 1)
    }

    /// Parse a label such as `"3d"`.
    pub fn parse(label: &str) -> Result<Self> {
        let bad = || {
            Error::invalid(
                "subshell",
                format!("{label:?}"),
                "a label such as \"1s\", \"2p\" or \"4f\"",
            )
        };
        let letter = label.chars().last().ok_or_else(bad)?;
        let n: u32 = label[..label.len() - letter.len_utf8()]
            .parse()
            .map_err(|_| bad())?;
        let l = L_LETTERS
            .iter()
            .position(|c| *c == letter)
            .ok_or_else(bad)? as u32;
        if n == 0 || l >= n {
            return Err(bad());
        }
        Ok(Subshell { n, l })
    }

    /// Label such as `"3d"`.
    pub fn label(&self) -> String {
        self.to_string()
    }
}

impl fmt::Display for Subshell {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let letter = L_LETTERS.get(self.l as usize).copied().unwrap_or('?');
        write!(f, "{}{}", self.n, letter)
    }
}

/// Occupancy of every occupied subshell, sorted by (n, l).
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct Configuration {
    shells: Vec<(Subshell, u32)>,
}

/// Noble-gas and closed-d cores used by the ionization-energy table.
fn core(symbol: &str) -> Option<&'static str> {
    Some(match symbol {
        "He" => "1s2",
        "Ne" => "1s2.2s2.2p6",
        "Ar" => "[Ne].3s2.3p6",
        "Kr" => "[Ar].3d10.4s2.4p6",
        "Xe" => "[Kr].4d10.5s2.5p6",
        "Rn" => "[Xe].4f14.5d10.6s2.6p6",
        "Cd" => "[Kr].4d10.5s2",
        "Hg" => "[Xe].4f14.5d10.6s2",
        _ => return None,
    })
}

impl Configuration {
    /// Parse `[Ar].3d6.4s2` (a bare ion is the empty string).
    pub fn parse(text: &str) -> Result<Self> {
        let mut config = Configuration::default();
        config.add_parsed(text, 0)?;
        config.shells.sort_by_key(|(s, _)| *s);
        Ok(config)
    }

    fn add_parsed(&mut self, text: &str, depth: u32) -> Result<()> {
        let bad = |why: &str| Error::invalid("configuration", format!("{text:?}"), why);
        for part in text.split('.').filter(|p| !p.is_empty()) {
            if let Some(symbol) = part.strip_prefix('[').and_then(|p| p.strip_suffix(']')) {
                let inner = core(symbol)
                    .ok_or_else(|| bad("cores allowed: [He] [Ne] [Ar] [Kr] [Xe] [Rn] [Cd] [Hg]"))?;
                if depth > 4 {
                    return Err(bad("cores nest too deeply"));
                }
                self.add_parsed(inner, depth + 1)?;
                continue;
            }
            // "3d6" → subshell "3d", occupancy 6; "4s" alone means one electron.
            let split = part
                .char_indices()
                .find(|(_, c)| c.is_ascii_alphabetic())
                .map(|(i, _)| i + 1)
                .ok_or_else(|| bad("each part must look like 3d6"))?;
            let subshell = Subshell::parse(&part[..split])?;
            let occupancy: u32 = if split == part.len() {
                1
            } else {
                part[split..]
                    .parse()
                    .map_err(|_| bad("occupancy must be a whole number"))?
            };
            if occupancy == 0 || occupancy > subshell.capacity() {
                return Err(bad("occupancy must be between 1 and the subshell capacity"));
            }
            if self.shells.iter().any(|(s, _)| *s == subshell) {
                return Err(bad("a subshell appears twice"));
            }
            self.shells.push((subshell, occupancy));
        }
        Ok(())
    }

    /// Occupied subshells with their occupancy, sorted by (n, l).
    pub fn shells(&self) -> &[(Subshell, u32)] {
        &self.shells
    }

    pub fn occupancy(&self, subshell: Subshell) -> u32 {
        self.shells
            .iter()
            .find(|(s, _)| *s == subshell)
            .map_or(0, |(_, k)| *k)
    }

    pub fn electrons(&self) -> u32 {
        self.shells.iter().map(|(_, k)| k).sum()
    }

    /// Outermost occupied shell: (n, electrons in that n); (1, 0) for a bare ion.
    pub fn valence_shell(&self) -> (u32, u32) {
        match self.shells.iter().map(|(s, _)| s.n).max() {
            None => (1, 0),
            Some(n) => (
                n,
                self.shells
                    .iter()
                    .filter(|(s, _)| s.n == n)
                    .map(|(_, k)| k)
                    .sum(),
            ),
        }
    }

    /// Written out without cores, e.g. `1s2.2s2.2p6.3s1`.
    pub fn label(&self) -> String {
        self.shells
            .iter()
            .map(|(s, k)| format!("{s}{k}"))
            .collect::<Vec<_>>()
            .join(".")
    }
}

/// The subshell that loses an electron between two configurations: among those whose
/// occupancy drops, the highest n, then the highest l (ions lose 4s before 3d, 6s before 4f/5d).
pub fn ionized_subshell(before: &Configuration, after: &Configuration) -> Option<Subshell> {
    before
        .shells()
        .iter()
        .filter(|(s, k)| after.occupancy(*s) < *k)
        .map(|(s, _)| *s)
        .max_by_key(|s| (s.n, s.l))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn expands_cores_and_sorts() {
        let c = Configuration::parse("[Ar].3d6.4s2").unwrap();
        assert_eq!(c.electrons(), 26);
        assert_eq!(c.occupancy(Subshell::new(3, 2)), 6);
        assert_eq!(c.shells()[0], (Subshell::new(1, 0), 2));
        assert_eq!(c.valence_shell(), (4, 2));
        let hg = Configuration::parse("[Hg].6p2").unwrap();
        assert_eq!(hg.electrons(), 82);
    }

    #[test]
    fn bare_ion_is_empty() {
        let c = Configuration::parse("").unwrap();
        assert_eq!(c.electrons(), 0);
        assert_eq!(c.valence_shell(), (1, 0));
    }

    #[test]
    fn rejects_malformed_labels() {
        for bad in ["[Zz].1s2", "1s3", "1p2", "3x2", "2s2.2s1", "s2"] {
            assert!(Configuration::parse(bad).is_err(), "{bad}");
        }
    }

    #[test]
    fn transition_metals_lose_4s_first() {
        let fe = Configuration::parse("[Ar].3d6.4s2").unwrap();
        let fe1 = Configuration::parse("[Ar].3d6.4s").unwrap();
        assert_eq!(ionized_subshell(&fe, &fe1), Some(Subshell::new(4, 0)));
    }
}

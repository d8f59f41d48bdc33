//! Short names for the laser and alignment axes scanned most often, each mapped to its address
//! in the one addressing scheme of the tool ([`crate::address`]), and the unit of an address
//! read from its key.

use crate::address::{Address, Segment};

/// The short names and the addresses they stand for.
///
/// | short name | address | unit |
/// |---|---|---|
/// | `intensity` | `laser.colours[0].intensity_wcm2` | W/cm² |
/// | `wavelength` | `laser.colours[0].wavelength_nm` | nm |
/// | `ellipticity` | `laser.colours[0].polarization.ellipticity` | 1 |
/// | `cep` | `laser.colours[0].phase_deg` (the carrier-envelope phase of a pulse) | deg |
/// | `two-colour-phase` | `laser.colours[1].phase_deg` (the second colour's phase) | deg |
/// | `second-colour-ratio` | `laser.colours[1].intensity_ratio` | 1 |
/// | `fwhm` | `laser.envelope.fwhm_fs` | fs |
/// | `alignment` | `target.alignment.mean_cos2` (⟨cos²β⟩ of the `exp_cos2` distribution) | 1 |
pub const ALIASES: [(&str, &str); 8] = [
    ("intensity", "laser.colours[0].intensity_wcm2"),
    ("wavelength", "laser.colours[0].wavelength_nm"),
    ("ellipticity", "laser.colours[0].polarization.ellipticity"),
    ("cep", "laser.colours[0].phase_deg"),
    ("two-colour-phase", "laser.colours[1].phase_deg"),
    ("second-colour-ratio", "laser.colours[1].intensity_ratio"),
    ("fwhm", "laser.envelope.fwhm_fs"),
    ("alignment", "target.alignment.mean_cos2"),
];

/// The address a parameter names: a short name from [`ALIASES`] or a full address.
///
/// # Errors
/// The address's syntax error; for a word that is neither, the message lists the short names.
pub fn resolve(parameter: &str) -> Result<Address, crate::address::AddressError> {
    let text = parameter.trim();
    if let Some((_, address)) = ALIASES.iter().find(|(name, _)| *name == text) {
        return address.parse();
    }
    text.parse().map_err(|e| match e {
        crate::address::AddressError::Syntax { text, reason } if !text.contains(['.', '[']) => {
            crate::address::AddressError::Syntax {
                text,
                reason: format!(
                    "{reason}; or one of the short names {}",
                    ALIASES
                        .iter()
                        .map(|(n, _)| *n)
                        .collect::<Vec<_>>()
                        .join(", ")
                ),
            }
        }
        other => other,
    })
}

/// The short name of an address, if it has one.
pub fn short_name(address: &Address) -> Option<&'static str> {
    let text = address.to_string();
    ALIASES
        .iter()
        .find(|(_, a)| *a == text)
        .map(|(name, _)| *name)
}

/// The unit of the value at an address, read from its last key (keys carry their unit: `_wcm2`,
/// `_nm`, `_deg`, `_fs`, `_ev`, `_au`, `_bohr`, …); `"1"` for dimensionless keys.
pub fn unit(address: &Address) -> &'static str {
    let key = address
        .path
        .iter()
        .rev()
        .find_map(|s| match s {
            Segment::Key(k) => Some(k.as_str()),
            _ => None,
        })
        .unwrap_or("");
    const SUFFIXES: [(&str, &str); 12] = [
        ("_wcm2", "W/cm2"),
        ("_nm", "nm"),
        ("_deg", "deg"),
        ("_fs", "fs"),
        ("_ev", "eV"),
        ("_au", "a.u."),
        ("_bohr", "bohr"),
        ("_angstrom", "angstrom"),
        ("_debye", "D"),
        ("_inv_bohr2", "1/bohr2"),
        ("_rad", "rad"),
        ("_mm", "mm"),
    ];
    SUFFIXES
        .iter()
        .find(|(s, _)| key.ends_with(s))
        .map(|(_, u)| *u)
        .unwrap_or("1")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn short_names_map_to_addresses_and_back() {
        for (name, address) in ALIASES {
            let a = resolve(name).unwrap();
            assert_eq!(a.to_string(), address);
            assert_eq!(short_name(&a), Some(name));
        }
        let full = resolve("target.channels[A].ip_ev").unwrap();
        assert_eq!(short_name(&full), None);
        assert_eq!(unit(&full), "eV");
        assert_eq!(unit(&resolve("intensity").unwrap()), "W/cm2");
        assert_eq!(unit(&resolve("alignment").unwrap()), "1");
        assert_eq!(unit(&resolve("cep").unwrap()), "deg");
    }

    #[test]
    fn an_unknown_word_lists_the_short_names() {
        let e = resolve("intensty").unwrap_err().to_string();
        assert!(
            e.contains("intensty") && e.contains("two-colour-phase"),
            "{e}"
        );
    }
}

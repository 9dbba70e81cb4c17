//! Element symbols.

/// Symbols by atomic number, 1 (H) to 103 (Lr). Heavier elements are left out on purpose:
/// their symbols (`Cn`, `Nh`, `Hs`, ...) would otherwise swallow an element and a primitive
/// written together, and no site pattern needs them.
const SYMBOLS: [&str; 103] = [
    "H", "He", "Li", "Be", "B", "C", "N", "O", "F", "Ne", "Na", "Mg", "Al", "Si", "P", "S", "Cl",
    "Ar", "K", "Ca", "Sc", "Ti", "V", "Cr", "Mn", "Fe", "Co", "Ni", "Cu", "Zn", "Ga", "Ge", "As",
    "Se", "Br", "Kr", "Rb", "Sr", "Y", "Zr", "Nb", "Mo", "Tc", "Ru", "Rh", "Pd", "Ag", "Cd", "In",
    "Sn", "Sb", "Te", "I", "Xe", "Cs", "Ba", "La", "Ce", "Pr", "Nd", "Pm", "Sm", "Eu", "Gd", "Tb",
    "Dy", "Ho", "Er", "Tm", "Yb", "Lu", "Hf", "Ta", "W", "Re", "Os", "Ir", "Pt", "Au", "Hg", "Tl",
    "Pb", "Bi", "Po", "At", "Rn", "Fr", "Ra", "Ac", "Th", "Pa", "U", "Np", "Pu", "Am", "Cm", "Bk",
    "Cf", "Es", "Fm", "Md", "No", "Lr",
];

/// The atomic number of an element symbol, written with its usual capitalization.
pub(crate) fn atomic_number(symbol: &str) -> Option<u8> {
    SYMBOLS
        .iter()
        .position(|s| *s == symbol)
        .map(|i| i as u8 + 1)
}

/// Elements that may be written aromatic (lower case), with their atomic numbers.
/// Two-letter ones come first so `se` is not read as `s` then `e`.
pub(crate) const AROMATIC: [(&str, u8); 9] = [
    ("se", 34),
    ("as", 33),
    ("te", 52),
    ("b", 5),
    ("c", 6),
    ("n", 7),
    ("o", 8),
    ("p", 15),
    ("s", 16),
];

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn symbols_round_trip() {
        assert_eq!(atomic_number("H"), Some(1));
        assert_eq!(atomic_number("Cl"), Some(17));
        assert_eq!(atomic_number("Br"), Some(35));
        assert_eq!(atomic_number("Lr"), Some(103));
        assert_eq!(atomic_number("Xx"), None);
        assert_eq!(atomic_number("cl"), None);
    }
}

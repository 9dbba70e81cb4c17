//! The periodic table as far as SMILES reading needs it: symbols and valence rules.
//!
//! Default valences are those of the OpenSMILES specification (organic subset: B 3; C 4;
//! N 3, 5; O 2; P 3, 5; S 2, 4, 6; halogens 1). Charged atoms take the valences of the
//! isoelectronic neutral element (N+ like C, O- like F), common practice in SMILES readers.

/// Element symbols by atomic number; index 0 is the `*` wildcard.
const SYMBOLS: [&str; 119] = [
    "*", "H", "He", "Li", "Be", "B", "C", "N", "O", "F", "Ne", "Na", "Mg", "Al", "Si", "P", "S",
    "Cl", "Ar", "K", "Ca", "Sc", "Ti", "V", "Cr", "Mn", "Fe", "Co", "Ni", "Cu", "Zn", "Ga", "Ge",
    "As", "Se", "Br", "Kr", "Rb", "Sr", "Y", "Zr", "Nb", "Mo", "Tc", "Ru", "Rh", "Pd", "Ag", "Cd",
    "In", "Sn", "Sb", "Te", "I", "Xe", "Cs", "Ba", "La", "Ce", "Pr", "Nd", "Pm", "Sm", "Eu", "Gd",
    "Tb", "Dy", "Ho", "Er", "Tm", "Yb", "Lu", "Hf", "Ta", "W", "Re", "Os", "Ir", "Pt", "Au", "Hg",
    "Tl", "Pb", "Bi", "Po", "At", "Rn", "Fr", "Ra", "Ac", "Th", "Pa", "U", "Np", "Pu", "Am", "Cm",
    "Bk", "Cf", "Es", "Fm", "Md", "No", "Lr", "Rf", "Db", "Sg", "Bh", "Hs", "Mt", "Ds", "Rg", "Cn",
    "Nh", "Fl", "Mc", "Lv", "Ts", "Og",
];

/// The symbol for an atomic number (`*` for 0, `?` past the table).
pub fn symbol(element: u8) -> &'static str {
    SYMBOLS.get(element as usize).copied().unwrap_or("?")
}

/// The atomic number for a symbol written with its first letter upper case.
pub fn atomic_number(symbol: &str) -> Option<u8> {
    SYMBOLS.iter().position(|s| *s == symbol).map(|i| i as u8)
}

/// Main-group elements whose valence we know: (atomic number, group, period).
const MAIN_GROUP: [(u8, u8, u8); 22] = [
    (5, 13, 2),
    (6, 14, 2),
    (7, 15, 2),
    (8, 16, 2),
    (9, 17, 2),
    (13, 13, 3),
    (14, 14, 3),
    (15, 15, 3),
    (16, 16, 3),
    (17, 17, 3),
    (31, 13, 4),
    (32, 14, 4),
    (33, 15, 4),
    (34, 16, 4),
    (35, 17, 4),
    (49, 13, 5),
    (50, 14, 5),
    (51, 15, 5),
    (52, 16, 5),
    (53, 17, 5),
    (85, 17, 6),
    (117, 17, 7),
];

/// [`MAIN_GROUP`] by atomic number, built once at compile time: valence rules are looked up
/// for every atom read.
const GROUP_PERIOD: [Option<(u8, u8)>; 256] = {
    let mut table = [None; 256];
    let mut k = 0;
    while k < MAIN_GROUP.len() {
        let (z, g, p) = MAIN_GROUP[k];
        table[z as usize] = Some((g, p));
        k += 1;
    }
    table
};

fn group_period(element: u8) -> Option<(u8, u8)> {
    GROUP_PERIOD[element as usize]
}

/// Outer-shell electrons of a main-group element (0 when unknown).
pub fn outer_electrons(element: u8) -> i32 {
    match element {
        1 => 1,
        _ => group_period(element).map_or(0, |(g, _)| g as i32 - 10),
    }
}

/// The valences an atom may have, lowest first, for the element and formal charge; `None`
/// when the element has no valence rule here (metals, noble gases, wildcard).
///
/// Period 2 follows the octet; heavier elements may expand it (P 3, 5; S 2, 4, 6; Cl up to 7).
pub fn allowed_valences(element: u8, charge: i8) -> Option<&'static [u8]> {
    if element == 1 {
        return match charge {
            0 => Some(&[1]),
            1 | -1 => Some(&[0]),
            _ => None,
        };
    }
    let (group, period) = group_period(element)?;
    let effective = group as i16 - charge as i16;
    let heavy = period > 2;
    Some(match (effective, heavy) {
        (13, _) => &[3],
        (14, _) => &[4],
        (15, false) if element == 7 && charge == 0 => &[3, 5],
        (15, false) => &[3],
        (15, true) => &[3, 5],
        (16, false) => &[2],
        (16, true) => &[2, 4, 6],
        (17, false) => &[1],
        (17, true) => &[1, 3, 5, 7],
        _ => return None,
    })
}

/// Default valences of the OpenSMILES organic subset, used to count implicit hydrogens on
/// atoms written without brackets.
pub fn organic_valences(element: u8) -> &'static [u8] {
    match element {
        5 => &[3],
        6 => &[4],
        7 | 15 => &[3, 5],
        8 => &[2],
        16 => &[2, 4, 6],
        9 | 17 | 35 | 53 | 85 | 117 => &[1],
        _ => &[],
    }
}

/// Pauling electronegativity, enough to rank neighbours (0 when unknown).
pub fn electronegativity(element: u8) -> f32 {
    match element {
        1 => 2.20,
        5 => 2.04,
        6 => 2.55,
        7 => 3.04,
        8 => 3.44,
        9 => 3.98,
        14 => 1.90,
        15 => 2.19,
        16 => 2.58,
        17 => 3.16,
        33 => 2.18,
        34 => 2.55,
        35 => 2.96,
        52 => 2.1,
        53 => 2.66,
        _ => 0.0,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn symbols_round_trip() {
        for z in 0..=118u8 {
            assert_eq!(atomic_number(symbol(z)), Some(z));
        }
        assert_eq!(symbol(17), "Cl");
        assert_eq!(symbol(200), "?");
    }

    #[test]
    fn charged_atoms_take_isoelectronic_valences() {
        assert_eq!(allowed_valences(7, 1), Some(&[4u8][..]));
        assert_eq!(allowed_valences(8, -1), Some(&[1u8][..]));
        assert_eq!(allowed_valences(16, 1), Some(&[3u8, 5][..]));
        assert_eq!(allowed_valences(26, 2), None);
    }
}

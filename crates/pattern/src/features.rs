//! What the atom primitives test, read off one molecule atom once: element, aromaticity,
//! charge, hydrogen counts, connections and rings as small numbers, so that the pre-filter
//! is a handful of bit tests and a primitive a field comparison (no walk over neighbour
//! lists for `H` or `X` on every test).

use mol::Molecule;

/// Counts from this value up share one bit in the filter masks ("this many or more"); a
/// primitive asking for such a count is not decided by the mask.
pub(crate) const COUNT_CAP: u8 = 31;

/// Elements from this atomic number up share one element/aromatic bit pair.
pub(crate) const ELEMENT_CAP: u8 = 127;

/// Charges outside `-CHARGE_CAP..=CHARGE_CAP - 1` share the outermost bits.
pub(crate) const CHARGE_CAP: i8 = 31;

/// The element/aromatic bit of the filter masks.
#[inline]
pub(crate) fn element_bit(element: u8, aromatic: bool) -> u8 {
    element.min(ELEMENT_CAP) * 2 + aromatic as u8
}

/// The charge bit of the filter masks: 1 to 62 for charges -31 to 30, 0 and 63 for the
/// charges beyond.
#[inline]
pub(crate) fn charge_bit(charge: i8) -> u8 {
    (charge.clamp(-CHARGE_CAP - 1, CHARGE_CAP) as i16 + 32) as u8
}

/// Whether a charge has a bit of its own (then the bit decides equality).
pub(crate) fn charge_exact(charge: i8) -> bool {
    (-CHARGE_CAP..CHARGE_CAP).contains(&charge)
}

/// The count bit of the filter masks.
#[inline]
fn count(value: usize) -> u8 {
    value.min(COUNT_CAP as usize) as u8
}

/// One atom's values, each as the bit it sets in the filter masks. The exact values that
/// matter beyond the caps are read from the molecule.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub(crate) struct AtomFeatures {
    /// [`element_bit`].
    pub(crate) element_bit: u8,
    /// [`charge_bit`].
    pub(crate) charge_bit: u8,
    /// `H`: hydrogens in counts and as atoms, capped.
    pub(crate) total_h: u8,
    /// `h`: hydrogens in counts (not written as atoms), capped.
    pub(crate) implicit_h: u8,
    /// `D`: explicit connections, capped.
    pub(crate) degree: u8,
    /// `X`: connections with hydrogens, capped.
    pub(crate) connectivity: u8,
    /// `R`: SSSR rings holding the atom, capped.
    pub(crate) ring_count: u8,
    /// `r`: smallest SSSR ring size, capped (0: not in a ring).
    pub(crate) smallest_ring: u8,
    /// Whether the fields were worked out (for the lazy table).
    pub(crate) known: bool,
}

impl AtomFeatures {
    /// Reads atom `atom` of `molecule` (which must be in range).
    pub(crate) fn of(molecule: &Molecule, atom: usize) -> AtomFeatures {
        let a = &molecule.atoms()[atom];
        let degree = molecule.degree(atom);
        AtomFeatures {
            element_bit: element_bit(a.element, a.aromatic),
            charge_bit: charge_bit(a.charge),
            total_h: count(molecule.total_hydrogens(atom)),
            implicit_h: count(a.hydrogens as usize),
            degree: count(degree),
            connectivity: count(degree + a.hydrogens as usize),
            ring_count: count(a.ring_count as usize),
            smallest_ring: count(a.smallest_ring as usize),
            known: true,
        }
    }
}

/// The values of a molecule's atoms, worked out on first use: a matcher made for one
/// substituent touches a few atoms only.
#[derive(Clone, Debug, Default)]
pub(crate) struct FeatureTable {
    atoms: Vec<AtomFeatures>,
}

impl FeatureTable {
    /// Forgets every atom, for a molecule of `atoms` atoms, keeping the buffer.
    pub(crate) fn reset(&mut self, atoms: usize) {
        self.atoms.clear();
        self.atoms.resize(atoms, AtomFeatures::default());
    }

    /// The values of `atom` (in range of the molecule the table was reset for).
    #[inline]
    pub(crate) fn get(&mut self, molecule: &Molecule, atom: usize) -> AtomFeatures {
        match self.atoms.get_mut(atom) {
            Some(f) if f.known => *f,
            Some(f) => {
                *f = AtomFeatures::of(molecule, atom);
                *f
            }
            // Never expected (the table is sized for the molecule); still correct.
            None => AtomFeatures::of(molecule, atom),
        }
    }
}

//! A system prepared for evaluation at any pH.

use std::cmp::Ordering;

use crate::cluster::partition;
use crate::enumerate::{Group, Table};
use crate::logsum::{self, exp10};
use crate::{
    Kind, Microspecies, Speciation, SpeciationError, System, MAX_CLUSTER_SITES, MAX_MAGNITUDE,
    MAX_SITES, MAX_SPECIES, MIN_FRACTION, PI_RANGE,
};

/// A validated system, enumerated once; evaluating it at a pH is then cheap.
#[derive(Clone, Debug)]
pub struct Microstates {
    n: usize,
    base_charge: i32,
    bases: usize,
    groups: Vec<Group>,
    tables: Vec<Table>,
    /// log10 coefficients of the whole binding polynomial, by protons lost.
    log_g: Vec<f64>,
    macro_pka: Vec<f64>,
    isoelectric_point: Option<f64>,
    method: String,
}

impl Microstates {
    /// Checks and enumerates the system, splitting coupled groups past
    /// [`MAX_CLUSTER_SITES`].
    ///
    /// # Reference
    ///
    /// The site-binding model with pairwise interactions and the binding-polynomial
    /// definition of macroscopic constants, as in Borkovec and Koper (Anal. Chem. 2000, 72,
    /// 3272) and Ullmann (J. Phys. Chem. B 2003, 107, 1263); both from memory. See the crate
    /// docs for the weight formula.
    pub fn new(system: &System) -> Result<Self, SpeciationError> {
        Self::with_max_cluster(system, MAX_CLUSTER_SITES)
    }

    /// As [`Microstates::new`] with another limit on exactly enumerated groups (clamped to
    /// 1..=24), e.g. to measure what the approximation costs in accuracy.
    pub fn with_max_cluster(system: &System, max_cluster: usize) -> Result<Self, SpeciationError> {
        validate(system)?;
        let cap = max_cluster.clamp(1, 24);
        let n = system.sites.len();
        let part = partition(&system.interaction, n, cap);
        let mut groups = Vec::with_capacity(part.groups.len());
        for sites in &part.groups {
            let m = sites.len();
            let mut w = vec![0.0; m * m];
            if !system.interaction.is_empty() {
                for (a, &i) in sites.iter().enumerate() {
                    for (b, &j) in sites.iter().enumerate() {
                        w[a * m + b] = system.interaction[i][j];
                    }
                }
            }
            let kinds: Vec<Kind> = sites.iter().map(|&i| system.sites[i].kind).collect();
            let pka: Vec<f64> = sites.iter().map(|&i| system.sites[i].pka).collect();
            let field = kinds
                .iter()
                .zip(&pka)
                .map(|(k, &p)| match k {
                    Kind::Acid => -p,
                    Kind::Base => 0.0,
                })
                .collect();
            let bases = kinds.iter().filter(|&&k| k == Kind::Base).count();
            groups.push(Group {
                sites: sites.clone(),
                kinds,
                field,
                w,
                bases,
                pka,
            });
        }
        let tables: Vec<Table> = groups.iter().map(|g| g.enumerate(MAX_SPECIES)).collect();
        let mut log_g = vec![0.0];
        for t in &tables {
            log_g = logsum::convolve(&log_g, &t.log_g);
        }
        let mut macro_pka: Vec<f64> = log_g.windows(2).map(|p| p[0] - p[1]).collect();
        let ordered = macro_pka.windows(2).all(|p| p[0] <= p[1]);
        macro_pka.sort_by(f64::total_cmp);
        let mut method = if part.dropped == 0 {
            "exact".to_string()
        } else {
            let mut sizes: Vec<usize> = part.groups.iter().map(Vec::len).collect();
            sizes.sort_unstable_by(|a, b| b.cmp(a));
            let sizes: Vec<String> = sizes.iter().map(usize::to_string).collect();
            format!(
                "clusters of {} sites: exact within, independent across ({} couplings ignored, largest |w| {:.3} pK)",
                sizes.join("+"),
                part.dropped,
                part.dropped_max
            )
        };
        if !ordered {
            // Cooperative couplings can invert stepwise constants (see Ullmann 2003); the
            // contract is an ascending list, so say that it was reordered.
            method.push_str("; stepwise constants not in order (cooperative coupling), sorted");
        }
        let bases = groups.iter().map(|g| g.bases).sum();
        let mut states = Self {
            n,
            base_charge: system.base_charge,
            bases,
            groups,
            tables,
            log_g,
            macro_pka,
            isoelectric_point: None,
            method,
        };
        states.isoelectric_point = states.find_isoelectric_point();
        Ok(states)
    }

    /// Number of sites.
    pub fn len(&self) -> usize {
        self.n
    }

    /// Whether there are no sites.
    pub fn is_empty(&self) -> bool {
        self.n == 0
    }

    /// Macroscopic constants, ascending.
    pub fn macro_pka(&self) -> &[f64] {
        &self.macro_pka
    }

    /// How the system is evaluated (`exact`, or the approximation used).
    pub fn method(&self) -> &str {
        &self.method
    }

    /// Isoelectric point in [`PI_RANGE`], if the mean charge crosses zero there.
    pub fn isoelectric_point(&self) -> Option<f64> {
        self.isoelectric_point
    }

    /// Mean number of protons lost relative to fully protonated, at `ph`.
    fn mean_lost(&self, ph: f64) -> f64 {
        let terms = self
            .log_g
            .iter()
            .enumerate()
            .map(|(p, &g)| g + p as f64 * ph);
        let log_z = logsum::sum(terms.clone());
        // The p = 0 term adds an exact zero (its weight is finite): skipping it leaves the
        // sum bit for bit the same and saves one exponential per evaluation, which the
        // isoelectric-point bisection repeats some fifty times.
        terms
            .enumerate()
            .skip(1)
            .map(|(p, t)| p as f64 * exp10(t - log_z))
            .sum()
    }

    /// Mean net charge at `ph` (NaN when `ph` is not finite).
    pub fn charge(&self, ph: f64) -> f64 {
        if self.n == 0 {
            return f64::from(self.base_charge);
        }
        f64::from(self.base_charge) + self.bases as f64 - self.mean_lost(ph)
    }

    fn find_isoelectric_point(&self) -> Option<f64> {
        /// A mean charge this close to 0 at an end of the range is neutral, not a sign.
        const PI_CHARGE_TOLERANCE: f64 = 1e-9;
        if self.n == 0 {
            return None;
        }
        let (mut lo, mut hi) = PI_RANGE;
        let quick = QuickCharge::new(self);
        // `y = 10^(pH - 7)` at the two ends: the midpoint's is their geometric mean, one
        // square root instead of a power of ten per step (see `QuickCharge`).
        let (mut y_lo, mut y_hi) = match &quick {
            Some(_) => (QuickCharge::y(lo), QuickCharge::y(hi)),
            None => (f64::NAN, f64::NAN),
        };
        // The charge must really change sign across the range. A molecule that is only
        // basic tends to charge 0 at high pH without crossing it, and rounding in the
        // proton count can leave its charge at -1e-16 there: that is no isoelectric point.
        let q = quick.as_ref();
        if !(self.compare_charge(q, lo, y_lo, PI_CHARGE_TOLERANCE) == Some(Ordering::Greater)
            && self.compare_charge(q, hi, y_hi, -PI_CHARGE_TOLERANCE) == Some(Ordering::Less))
        {
            return None;
        }
        // The mean charge falls strictly with pH (its slope is -ln10 times the variance of
        // the proton count), so bisection on the sign converges to the one root.
        for _ in 0..200 {
            let mid = 0.5 * (lo + hi);
            if mid <= lo || mid >= hi {
                break;
            }
            let y = (y_lo * y_hi).sqrt();
            let sign = match q {
                // A quick charge within its margin of 0 is a charge within 2e-9 of 0 at
                // most (some 2e-11 for a typical molecule): this pH is the isoelectric
                // point to far better than any constant behind it. Bisecting on in the
                // exact charge took about 12 more steps, each costing some 2n + 1
                // exponentials, only to place the root of a curve whose own rounding is
                // of that order (callgrind over 2,000 MOSES molecules: about 15M
                // instructions, 4 % of a run).
                Some(quick) => match quick.compare(y, 0.0) {
                    Some(sign) => sign,
                    None => return Some(mid),
                },
                None => self.charge(mid).partial_cmp(&0.0).unwrap_or(Ordering::Less),
            };
            if sign == Ordering::Greater {
                lo = mid;
                y_lo = y;
            } else {
                hi = mid;
                y_hi = y;
            }
            if hi - lo < 1e-12 {
                break;
            }
        }
        Some(0.5 * (lo + hi))
    }

    /// How [`Microstates::charge`] at `ph` compares with `threshold`, `y` being
    /// `10^(ph - 7)` for the quick charge. The quick value decides only where it is far
    /// enough from `threshold` that `charge` must compare the same way; nearer, `charge`
    /// itself decides, so the answer is always the one `charge` gives.
    fn compare_charge(
        &self,
        quick: Option<&QuickCharge>,
        ph: f64,
        y: f64,
        threshold: f64,
    ) -> Option<Ordering> {
        quick
            .and_then(|q| q.compare(y, threshold))
            .or_else(|| self.charge(ph).partial_cmp(&threshold))
    }

    /// log10 of each group's partition function at `ph`.
    fn group_log_z(&self, ph: f64) -> Vec<f64> {
        self.tables
            .iter()
            .map(|t| logsum::sum(t.log_g.iter().enumerate().map(|(p, &g)| g + p as f64 * ph)))
            .collect()
    }

    /// The `keep` most abundant microstates at `ph` with log10 fraction at least `cut`
    /// (always at least the most abundant one), as (log10 fraction, mask per group).
    fn top_states(&self, ph: f64, keep: usize, cut: f64) -> Vec<(f64, Vec<u32>)> {
        let log_z = self.group_log_z(ph);
        // Partial states over the groups seen so far, stored as back-pointers (index of the
        // partial one level up, mask of this group) so that extending one costs O(1).
        let mut levels: Vec<Vec<(usize, u32)>> = Vec::with_capacity(self.groups.len());
        let mut current: Vec<(f64, usize)> = vec![(0.0, 0)];
        for (t, &lz) in self.tables.iter().zip(&log_z) {
            let own = ranked_candidates(t, ph, lz, keep);
            let mut next: Vec<(f64, usize, u32)> = Vec::with_capacity(current.len() * own.len());
            for &(f, idx) in &current {
                for &(g, mask) in &own {
                    next.push((f + g, idx, mask));
                }
            }
            // Any of the `keep` best full states restricts to one of the `keep` best over
            // the groups seen so far, and a fraction only shrinks as groups are multiplied
            // in, so pruning on rank and on `cut` here loses none of the states returned.
            next.sort_by(|a, b| b.0.total_cmp(&a.0).then(a.1.cmp(&b.1)).then(a.2.cmp(&b.2)));
            next.truncate(kept_count(next.iter().map(|x| x.0), keep, cut));
            current = next
                .iter()
                .enumerate()
                .map(|(i, &(f, _, _))| (f, i))
                .collect();
            levels.push(
                next.into_iter()
                    .map(|(_, parent, mask)| (parent, mask))
                    .collect(),
            );
        }
        current
            .into_iter()
            .map(|(f, mut idx)| {
                let mut masks = vec![0u32; levels.len()];
                for (g, level) in levels.iter().enumerate().rev() {
                    let (parent, mask) = level[idx];
                    masks[g] = mask;
                    idx = parent;
                }
                (f, masks)
            })
            .collect()
    }

    /// [`Microstates::top_states`] for a system of one group (most are): the same steps
    /// on the same numbers, without the lists that combine groups.
    fn one_group_top_states(&self, ph: f64, keep: usize, cut: f64) -> Vec<(f64, u32)> {
        let t = &self.tables[0];
        let lz = logsum::sum(t.log_g.iter().enumerate().map(|(p, &g)| g + p as f64 * ph));
        let mut own = ranked_candidates(t, ph, lz, keep);
        // As `top_states` adds each to the empty state's 0 (which makes -0 into +0) and
        // sorts again.
        for x in &mut own {
            x.0 += 0.0;
        }
        own.sort_by(|a, b| b.0.total_cmp(&a.0).then(a.1.cmp(&b.1)));
        own.truncate(kept_count(own.iter().map(|x| x.0), keep, cut));
        own
    }

    fn species_from_masks(&self, masks: &[u32], log_fraction: f64) -> Microspecies {
        let mut charged = vec![false; self.n];
        let mut charge = self.base_charge;
        for (g, &mask) in self.groups.iter().zip(masks) {
            for (local, &site) in g.sites.iter().enumerate() {
                charged[site] = mask >> local & 1 == 1;
            }
            charge += g.charge(mask);
        }
        Microspecies {
            charged,
            charge,
            fraction: exp10(log_fraction),
        }
    }

    /// Microspecies at `ph` as listed in [`Speciation::species`].
    pub fn species(&self, ph: f64) -> Vec<Microspecies> {
        let mut out: Vec<Microspecies> = if self.tables.len() == 1 {
            self.one_group_top_states(ph, MAX_SPECIES, MIN_FRACTION.log10())
                .iter()
                .map(|&(f, mask)| self.species_from_masks(std::slice::from_ref(&mask), f))
                .collect()
        } else {
            self.top_states(ph, MAX_SPECIES, MIN_FRACTION.log10())
                .iter()
                .map(|(f, masks)| self.species_from_masks(masks, *f))
                .collect()
        };
        // Equal fractions (symmetry-equivalent microstates) list in site order.
        out.sort_by(|a, b| {
            b.fraction
                .total_cmp(&a.fraction)
                .then_with(|| b.charged.cmp(&a.charged))
        });
        out
    }

    /// Fraction at `ph` of the microstate with these charged sites (0 when the list does not
    /// have one entry per site).
    pub fn fraction(&self, charged: &[bool], ph: f64) -> f64 {
        if charged.len() != self.n {
            return 0.0;
        }
        let log_z = self.group_log_z(ph);
        let mut lf = 0.0;
        for (g, lz) in self.groups.iter().zip(log_z) {
            let mut mask = 0u32;
            for (local, &site) in g.sites.iter().enumerate() {
                if charged[site] {
                    mask |= 1 << local;
                }
            }
            lf += g.state_log_weight(mask) + g.lost(mask) as f64 * ph - lz;
        }
        exp10(lf)
    }

    /// [`Microstates::speciation`] of a system used once: its constants and method are
    /// handed over rather than copied.
    pub(crate) fn into_speciation(self, ph: f64) -> Result<Speciation, SpeciationError> {
        check_ph(ph)?;
        let charge_at_ph = self.charge(ph);
        let species = self.species(ph);
        Ok(Speciation {
            macro_pka: self.macro_pka,
            ph,
            charge_at_ph,
            species,
            isoelectric_point: self.isoelectric_point,
            method: self.method,
        })
    }

    /// The full result at `ph`.
    pub fn speciation(&self, ph: f64) -> Result<Speciation, SpeciationError> {
        check_ph(ph)?;
        Ok(Speciation {
            macro_pka: self.macro_pka.clone(),
            ph,
            charge_at_ph: self.charge(ph),
            species: self.species(ph),
            isoelectric_point: self.isoelectric_point,
            method: self.method.clone(),
        })
    }
}

/// A group's stored candidate microstates at `ph` as (log10 fraction within the group,
/// mask), `lz` being the group's log10 partition function there: the `keep` most abundant,
/// most abundant first (equal ones by mask).
fn ranked_candidates(t: &Table, ph: f64, lz: f64, keep: usize) -> Vec<(f64, u32)> {
    let mut own: Vec<(f64, u32)> = t
        .candidates
        .iter()
        .map(|c| (c.log_w + c.lost as f64 * ph - lz, c.mask))
        .collect();
    own.sort_by(|a, b| b.0.total_cmp(&a.0).then(a.1.cmp(&b.1)));
    own.truncate(keep);
    own
}

/// How many of a list of log10 fractions, most abundant first, are kept: at most `keep`,
/// at least the first, and beyond it only those at `cut` or above.
fn kept_count(fractions: impl Iterator<Item = f64>, keep: usize, cut: f64) -> usize {
    fractions
        .take(keep)
        .enumerate()
        .take_while(|&(i, f)| i == 0 || f >= cut)
        .count()
}

/// The mean charge over [`PI_RANGE`] from the binding polynomial in `y = 10^(pH - 7)`,
/// evaluated by Horner's rule: no power of ten per pH (the bisection passes `y` as the
/// geometric mean of its ends' values) instead of two per coefficient (and a logarithm) in
/// [`Microstates::charge`]. The isoelectric-point bisection evaluates the charge some 45
/// times a molecule; this answers every step where the charge is farther than
/// [`QuickCharge::margin`] from 0, and nearly always the two tests at the ends of the range
/// that come first. The first midpoint where it is nearer ends the search: the charge
/// there is within about the margin of 0. Where the curve is flat at its root (between an
/// amide O and an alcohol, say, all species neutral) that pH can lie some 1e-4 from the
/// root of the exact charge; the isoelectric point of such a curve is not defined any
/// closer.
///
/// Both evaluate the same stored `log_g`. Rounding a few ulp in exponents of magnitude up
/// to `T = max |log_g| + 16 n` gives each weight a relative error of about `3e-15 T` in
/// either evaluation, so each mean proton count is within `n * 3e-15 * T` of the exact one.
/// The margin is ten times the two together, `6e-14 n T`, worked out for each system:
/// with at most 16 protons and `|log_g|` at most 1000 it is at most 1.2e-9, and for a
/// typical molecule (4 protons, `T` near 100) some 2e-11. A quick value beyond the margin
/// has the sign that [`Microstates::charge`] computes.
///
/// `y` from square roots: every bisection point is `-2 + 18 k / 2^j` with `j` at most 45,
/// exact in a double, so each midpoint's `y` is exactly the geometric mean of its ends'
/// and the one rounding of the product and of the root add some 2e-16 to its relative
/// error per step: after the 45 steps at most 1e-14 beyond that of `10^(pH - 7)` itself,
/// which moves a mean proton count by at most `n^2 / 4` times that, below `48e-15 n^2`,
/// the part of `n * 3e-15 * T` that `T >= 16 n` already books. (The unit tests find an
/// isoelectric point exactly where bisection on [`Microstates::charge`] alone finds one,
/// with the exact charge there within 1.2e-9 of 0, over 3,000 random systems of up to 18
/// sites and 3,000 of up to 4.)
struct QuickCharge {
    /// `(b[p], p * b[p])` with `b[p] = 10^(log_g[p] + 7 p - max)`, p = 0..=n (the largest
    /// `b` is 1), side by side for the Horner loop.
    b: Vec<(f64, f64)>,
    /// Charge of the fully protonated form.
    top: f64,
    /// Quick values within this of 0 are not trusted with the sign.
    margin: f64,
}

impl QuickCharge {
    /// The middle of [`PI_RANGE`]: `y` stays within `10^±9`.
    const PH0: f64 = 7.0;
    /// Longest polynomial (protons) taken: `y^16` stays within `10^±144`, so neither the
    /// Horner sums overflow nor the whole polynomial underflows.
    const MAX_DEGREE: usize = 16;
    /// Largest `|log_g|` taken, which bounds the rounding of the exponents.
    const MAX_LOG_G: f64 = 1000.0;
    /// The margin per proton and per unit of `T` (see the type's docs).
    const MARGIN_PER_N_T: f64 = 6e-14;

    fn new(states: &Microstates) -> Option<Self> {
        let log_g = &states.log_g;
        let degree = log_g.len().checked_sub(1)?;
        if degree > Self::MAX_DEGREE
            || !log_g
                .iter()
                .all(|g| g.is_finite() && g.abs() <= Self::MAX_LOG_G)
        {
            return None;
        }
        debug_assert!(PI_RANGE.0 >= Self::PH0 - 9.0 && PI_RANGE.1 <= Self::PH0 + 9.0);
        let exponents: Vec<f64> = log_g
            .iter()
            .enumerate()
            .map(|(p, &g)| g + p as f64 * Self::PH0)
            .collect();
        let max = exponents.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        let b = exponents
            .iter()
            .enumerate()
            .map(|(p, &e)| {
                let x = exp10(e - max);
                (x, p as f64 * x)
            })
            .collect();
        let n = degree as f64;
        let t = log_g.iter().fold(0.0, |m: f64, g| m.max(g.abs())) + 16.0 * n;
        Some(Self {
            b,
            top: f64::from(states.base_charge) + states.bases as f64,
            margin: Self::MARGIN_PER_N_T * n * t,
        })
    }

    /// `y` at `ph`.
    fn y(ph: f64) -> f64 {
        exp10(ph - Self::PH0)
    }

    /// How the charge at `y` compares with `threshold`, where the quick value is farther
    /// than the margin from it (`None` nearer: only the exact charge can tell).
    fn compare(&self, y: f64, threshold: f64) -> Option<Ordering> {
        let c = self.charge_at(y);
        if c > threshold + self.margin {
            Some(Ordering::Greater)
        } else if c < threshold - self.margin {
            Some(Ordering::Less)
        } else {
            None
        }
    }

    /// The charge at the pH where `y = 10^(pH - 7)`.
    fn charge_at(&self, y: f64) -> f64 {
        let (mut z, mut lost) = (0.0, 0.0);
        for &(b, pb) in self.b.iter().rev() {
            z = z * y + b;
            lost = lost * y + pb;
        }
        self.top - lost / z
    }
}

pub(crate) fn check_ph(ph: f64) -> Result<(), SpeciationError> {
    if ph.is_finite() && ph.abs() <= MAX_MAGNITUDE {
        Ok(())
    } else {
        Err(SpeciationError::BadPh { value: ph })
    }
}

fn validate(system: &System) -> Result<(), SpeciationError> {
    let n = system.sites.len();
    if n > MAX_SITES {
        return Err(SpeciationError::TooManySites {
            count: n,
            max: MAX_SITES,
        });
    }
    for (site, s) in system.sites.iter().enumerate() {
        if !(s.pka.is_finite() && s.pka.abs() <= MAX_MAGNITUDE) {
            return Err(SpeciationError::BadPka { site, value: s.pka });
        }
    }
    let w = &system.interaction;
    if w.is_empty() {
        return Ok(());
    }
    if w.len() != n {
        return Err(SpeciationError::InteractionRows {
            rows: w.len(),
            sites: n,
        });
    }
    for (row, r) in w.iter().enumerate() {
        if r.len() != n {
            return Err(SpeciationError::InteractionRowLength {
                row,
                len: r.len(),
                sites: n,
            });
        }
    }
    for (i, row) in w.iter().enumerate() {
        for (j, &value) in row.iter().enumerate() {
            if !(value.is_finite() && value.abs() <= MAX_MAGNITUDE) {
                return Err(SpeciationError::BadInteraction { i, j, value });
            }
        }
    }
    for (i, row) in w.iter().enumerate() {
        if row[i] != 0.0 {
            return Err(SpeciationError::Diagonal { i, value: row[i] });
        }
        for (j, &a) in row.iter().enumerate().skip(i + 1) {
            let b = w[j][i];
            if (a - b).abs() > 1e-9 * a.abs().max(b.abs()).max(1.0) {
                return Err(SpeciationError::Asymmetric {
                    i,
                    j,
                    wij: a,
                    wji: b,
                });
            }
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::SiteInput;

    fn acid(pka: f64) -> SiteInput {
        SiteInput {
            kind: Kind::Acid,
            pka,
        }
    }
    fn base(pka: f64) -> SiteInput {
        SiteInput {
            kind: Kind::Base,
            pka,
        }
    }

    /// Uniform numbers in [0, 1) from a fixed seed (a 64-bit linear congruential
    /// generator, Knuth's MMIX constants): the same cases on every run.
    fn uniform(seed: u64) -> impl FnMut() -> f64 {
        let mut state = seed;
        move || {
            state = state
                .wrapping_mul(6_364_136_223_846_793_005)
                .wrapping_add(1_442_695_040_888_963_407);
            (state >> 11) as f64 / (1u64 << 53) as f64
        }
    }

    /// `n` sites with pKa uniform in [low, low + span), each an acid or a base by a coin.
    fn random_sites(
        next: &mut impl FnMut() -> f64,
        n: usize,
        low: f64,
        span: f64,
    ) -> Vec<SiteInput> {
        (0..n)
            .map(|_| {
                let pka = low + span * next();
                if next() < 0.5 {
                    acid(pka)
                } else {
                    base(pka)
                }
            })
            .collect()
    }

    /// The isoelectric point by bisection on [`Microstates::charge`] alone, to 1e-12 pH.
    fn isoelectric_point_by_exact_charge(m: &Microstates) -> Option<f64> {
        let (mut lo, mut hi) = PI_RANGE;
        if !(m.charge(lo) > 1e-9 && m.charge(hi) < -1e-9) {
            return None;
        }
        for _ in 0..200 {
            let mid = 0.5 * (lo + hi);
            if mid <= lo || mid >= hi {
                break;
            }
            if m.charge(mid) > 0.0 {
                lo = mid;
            } else {
                hi = mid;
            }
            if hi - lo < 1e-12 {
                break;
            }
        }
        Some(0.5 * (lo + hi))
    }

    #[test]
    fn quick_charge_finds_a_point_of_zero_charge_where_exact_bisection_finds_one() {
        // Pseudo-random systems (a fixed linear congruential sequence): 1 to 18 sites, pKa
        // across and beyond the window, couplings of either sign, some fixed charge.
        let with_point = compare_isoelectric_points(0x9e37_79b9_7f4a_7c15, 18);
        // Enough of them have an isoelectric point for the comparison to mean something.
        assert!(with_point > 500, "{with_point} of 3000");
    }

    #[test]
    fn quick_charge_with_the_smallest_margins_finds_the_isoelectric_point() {
        // Few sites and small `log_g` give the smallest margins (a few 1e-12).
        let with_point = compare_isoelectric_points(0x2545_f491_4f6c_dd1d, 4);
        assert!(with_point > 500, "{with_point} of 3000");
    }

    /// Over 3,000 pseudo-random systems of 1 to `max_sites` sites, checks that an
    /// isoelectric point is found exactly when bisection on the exact charge finds one, that
    /// the exact charge there is within the quick margin's bound (1.2e-9) of 0, and that
    /// it lies within the pH span over which the exact charge stays that close to 0
    /// around the exact bisection's point; returns how many have one.
    fn compare_isoelectric_points(seed: u64, max_sites: usize) -> usize {
        let mut next = uniform(seed);
        let mut with_point = 0;
        for case in 0..3000 {
            let n = 1 + (next() * max_sites as f64) as usize;
            let sites = random_sites(&mut next, n, -6.0, 28.0);
            let mut interaction = vec![vec![0.0; n]; n];
            for i in 0..n {
                for j in (i + 1)..n {
                    if next() < 0.6 {
                        let w = -2.5 + 4.0 * next();
                        interaction[i][j] = w;
                        interaction[j][i] = w;
                    }
                }
            }
            let system = System {
                sites,
                interaction,
                base_charge: (next() * 3.0) as i32 - 1,
            };
            let m = Microstates::new(&system).unwrap();
            let expected = isoelectric_point_by_exact_charge(&m);
            let found = m.isoelectric_point();
            assert_eq!(
                found.is_some(),
                expected.is_some(),
                "case {case}: {system:?}"
            );
            if let (Some(found), Some(expected)) = (found, expected) {
                let q = m.charge(found);
                assert!(q.abs() <= 1.2e-9, "case {case}: charge {q} at {found}");
                // Between the two points the charge is monotonic, so it stays within the
                // bound there too: the found point is no farther off than the flatness of
                // the curve allows.
                let (a, b) = (found.min(expected), found.max(expected));
                let span = m.charge(a) - m.charge(b);
                assert!(
                    span <= 2.4e-9 + 1e-12,
                    "case {case}: {found} against {expected}"
                );
            }
            with_point += usize::from(expected.is_some());
        }
        with_point
    }

    #[test]
    fn diacid_second_constant_shifted_by_w() {
        // Two different acid sites far apart in pKa: macro constants are the micro ones,
        // the second pushed up by w.
        let s = System {
            sites: vec![acid(3.0), acid(8.0)],
            interaction: vec![vec![0.0, 1.5], vec![1.5, 0.0]],
            base_charge: 0,
        };
        let m = Microstates::new(&s).unwrap();
        assert!((m.macro_pka()[0] - 3.0).abs() < 1e-3);
        assert!((m.macro_pka()[1] - 9.5).abs() < 1e-3);
    }

    #[test]
    fn cooperative_coupling_inverts_stepwise_constants_and_says_so() {
        // w = -3 between two like sites: G1 = 2e-4, G2 = 1e-5, so log10(G0/G1) = 3.70 comes
        // before log10(G1/G2) = 1.30; the list is sorted and the method says why.
        let s = System {
            sites: vec![acid(4.0), acid(4.0)],
            interaction: vec![vec![0.0, -3.0], vec![-3.0, 0.0]],
            base_charge: 0,
        };
        let m = Microstates::new(&s).unwrap();
        let l2 = 2f64.log10();
        assert!((m.macro_pka()[0] - (1.0 + l2)).abs() < 1e-9);
        assert!((m.macro_pka()[1] - (4.0 - l2)).abs() < 1e-9);
        assert_eq!(
            m.method(),
            "exact; stepwise constants not in order (cooperative coupling), sorted"
        );
        // The charge comes from the polynomial, not from the sorted list: at pH 2.5,
        // weights 1, 2 * 10^-1.5, 10^(-3 + 3) = 1.
        let (a, b) = (2.0 * 10f64.powf(-1.5), 1.0);
        let expect = -(a + 2.0 * b) / (1.0 + a + b);
        assert!((m.charge(2.5) - expect).abs() < 1e-12);
    }

    #[test]
    fn identical_acids_get_statistical_factors() {
        let s = System {
            sites: vec![acid(4.0), acid(4.0)],
            interaction: vec![],
            base_charge: 0,
        };
        let m = Microstates::new(&s).unwrap();
        let l2 = 2f64.log10();
        assert!((m.macro_pka()[0] - (4.0 - l2)).abs() < 1e-12);
        assert!((m.macro_pka()[1] - (4.0 + l2)).abs() < 1e-12);
    }

    #[test]
    fn amino_acid_attraction_favours_zwitterion() {
        // Acid 4.0, base 8.0, attraction 2 pK units: the zwitterion outweighs the neutral
        // tautomer by 10^(8 - 4 + 2) = 10^6 at any pH.
        let s = System {
            sites: vec![acid(4.0), base(8.0)],
            interaction: vec![vec![0.0, -2.0], vec![-2.0, 0.0]],
            base_charge: 0,
        };
        let m = Microstates::new(&s).unwrap();
        let zw = m.fraction(&[true, true], 6.0);
        let neutral = m.fraction(&[false, false], 6.0);
        assert!(((zw / neutral).log10() - 6.0).abs() < 1e-9);
        let sp = m.speciation(6.0).unwrap();
        assert_eq!(sp.species[0].charged, vec![true, true]);
        assert_eq!(sp.species[0].charge, 0);
    }

    #[test]
    fn fractions_from_candidates_match_direct_fraction() {
        let s = System {
            sites: vec![acid(3.0), base(9.0), acid(4.5), base(10.5)],
            interaction: vec![
                vec![0.0, -0.8, 0.6, -0.3],
                vec![-0.8, 0.0, -0.5, 0.7],
                vec![0.6, -0.5, 0.0, -0.4],
                vec![-0.3, 0.7, -0.4, 0.0],
            ],
            base_charge: 0,
        };
        let m = Microstates::new(&s).unwrap();
        let sp = m.species(5.0);
        for x in &sp {
            assert!((x.fraction - m.fraction(&x.charged, 5.0)).abs() < 1e-12);
        }
        // All 16 microstates listed at most: they add up to the whole.
        let all = m.top_states(5.0, 16, f64::NEG_INFINITY);
        let total: f64 = all.iter().map(|(f, _)| exp10(*f)).sum();
        assert!((total - 1.0).abs() < 1e-12);
    }

    #[test]
    fn one_group_top_states_are_those_of_the_general_walk() {
        // Coupled sites (one group) of 1 to 7 sites, at several pH: the short way lists the
        // very states, fractions bit for bit, that the walk over groups lists.
        let mut next = uniform(0x1234_5678_9abc_def1);
        for case in 0..300 {
            let n = 1 + (next() * 7.0) as usize;
            let sites = random_sites(&mut next, n, -2.0, 18.0);
            let mut interaction = vec![vec![0.0; n]; n];
            for i in 0..n {
                for j in (i + 1)..n {
                    let w = 0.1 + next();
                    interaction[i][j] = w;
                    interaction[j][i] = w;
                }
            }
            let m = Microstates::new(&System {
                sites,
                interaction,
                base_charge: 0,
            })
            .unwrap();
            assert_eq!(m.tables.len(), 1, "case {case}");
            for ph in [0.0, 4.5, 7.4, 12.0] {
                for keep in [1, 3, 16] {
                    let cut = MIN_FRACTION.log10();
                    let general: Vec<(u64, Vec<u32>)> = m
                        .top_states(ph, keep, cut)
                        .into_iter()
                        .map(|(f, masks)| (f.to_bits(), masks))
                        .collect();
                    let short: Vec<(u64, Vec<u32>)> = m
                        .one_group_top_states(ph, keep, cut)
                        .into_iter()
                        .map(|(f, mask)| (f.to_bits(), vec![mask]))
                        .collect();
                    assert_eq!(general, short, "case {case} pH {ph} keep {keep}");
                }
            }
        }
    }

    #[test]
    fn permanent_cation_with_bases_has_no_isoelectric_point() {
        let s = System {
            sites: vec![base(9.0)],
            interaction: vec![],
            base_charge: 1,
        };
        let m = Microstates::new(&s).unwrap();
        assert_eq!(m.isoelectric_point(), None);
        assert!((m.charge(20.0) - 1.0).abs() < 1e-9);
    }

    #[test]
    fn no_sites() {
        let s = System {
            sites: vec![],
            interaction: vec![],
            base_charge: 0,
        };
        let sp = crate::try_speciate(&s, 7.0).unwrap();
        assert!(sp.macro_pka.is_empty());
        assert_eq!(sp.isoelectric_point, None);
        assert_eq!(sp.species.len(), 1);
        assert_eq!(sp.species[0].fraction, 1.0);
        assert_eq!(sp.charge_at_ph, 0.0);
    }

    #[test]
    fn invalid_input_is_reported_not_panicked() {
        let s = System {
            sites: vec![acid(f64::NAN)],
            interaction: vec![],
            base_charge: 0,
        };
        let sp = crate::speciate(&s, 7.0);
        assert_eq!(sp.method, "invalid input: site 0: pKa NaN is not usable; a pKa must be a finite number between -1000 and 1000");
        assert!(sp.species.is_empty());
    }
}

//! Exact enumeration of the microstates of one group of coupled sites.

use std::cmp::Ordering;
use std::collections::BinaryHeap;

use crate::logsum::Accumulator;
use crate::Kind;

/// One group's sites in local numbering.
#[derive(Clone, Debug)]
pub(crate) struct Group {
    /// Global index of each local site.
    pub(crate) sites: Vec<usize>,
    /// Kind of each local site.
    pub(crate) kinds: Vec<Kind>,
    /// log10 weight at pH 0 of charging each site alone, relative to the fully protonated
    /// reference: `-pKa` for an acid (charging loses a proton) and `0` for a base (the
    /// charged, protonated form is the reference). See `state_log_weight`.
    pub(crate) field: Vec<f64>,
    /// Couplings, local numbering, row-major `n * n`.
    pub(crate) w: Vec<f64>,
    /// Number of bases: a base's neutral form has lost a proton.
    pub(crate) bases: usize,
    /// Microscopic pKa of each local site.
    pub(crate) pka: Vec<f64>,
}

/// A stored microstate: its local mask, log10 weight at pH 0, protons lost.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct Candidate {
    pub(crate) mask: u32,
    pub(crate) log_w: f64,
    pub(crate) lost: usize,
}

impl Eq for Candidate {}

impl PartialOrd for Candidate {
    fn partial_cmp(&self, other: &Self) -> Option<Ordering> {
        Some(self.cmp(other))
    }
}

impl Ord for Candidate {
    // Reversed, so that `BinaryHeap` keeps the weakest on top and can drop it.
    fn cmp(&self, other: &Self) -> Ordering {
        other
            .log_w
            .total_cmp(&self.log_w)
            .then(self.mask.cmp(&other.mask))
    }
}

/// What the enumeration keeps of a group.
#[derive(Clone, Debug)]
pub(crate) struct Table {
    /// `log10 G_p`, p = protons lost relative to fully protonated, `0..=n`.
    pub(crate) log_g: Vec<f64>,
    /// Per p, the `keep` heaviest microstates; within one p their order does not depend on
    /// pH, so the union holds the `keep` most abundant microstates at every pH.
    pub(crate) candidates: Vec<Candidate>,
}

impl Group {
    pub(crate) fn len(&self) -> usize {
        self.sites.len()
    }

    /// Protons lost by a local mask relative to fully protonated: charged acids plus
    /// neutral bases.
    pub(crate) fn lost(&self, mask: u32) -> usize {
        let mut lost = 0;
        for (i, k) in self.kinds.iter().enumerate() {
            let charged = mask >> i & 1 == 1;
            lost += match k {
                Kind::Acid => usize::from(charged),
                Kind::Base => usize::from(!charged),
            };
        }
        lost
    }

    /// Charge relative to the all-neutral form: charged bases minus charged acids.
    pub(crate) fn charge(&self, mask: u32) -> i32 {
        let mut z = 0;
        for (i, k) in self.kinds.iter().enumerate() {
            if mask >> i & 1 == 1 {
                z += match k {
                    Kind::Acid => -1,
                    Kind::Base => 1,
                };
            }
        }
        z
    }

    /// log10 weight at pH 0 of a microstate, up to a constant common to the group.
    ///
    /// From the crate-level model, `log10 W(x, pH) = sum_i x_i h_i - sum_{i<j} w_ij x_i x_j +
    /// pH * (charged acids - charged bases)` with `h = -pKa` (acid), `+pKa` (base). The pH
    /// term equals `pH * (lost - bases)`; dropping the constant `-pH * bases` leaves
    /// `weight + lost * pH` with `weight` returned here, shifted by `-sum pKa(bases)` so
    /// that the fully protonated state sits at 0 (keeps magnitudes small).
    pub(crate) fn state_log_weight(&self, mask: u32) -> f64 {
        let n = self.len();
        let mut lw = 0.0;
        for i in 0..n {
            if mask >> i & 1 == 1 {
                lw += self.field[i];
                for j in (i + 1)..n {
                    if mask >> j & 1 == 1 {
                        lw -= self.w[i * n + j];
                    }
                }
            } else if self.kinds[i] == Kind::Base {
                lw -= self.pka[i];
            }
        }
        lw
    }

    /// Enumerates all `2^n` microstates in Gray-code order, one flip per step, so each
    /// state costs one update of `n` local fields instead of an `n^2` evaluation.
    ///
    /// # Reference
    ///
    /// Binary reflected Gray code (F. Gray, "Pulse code communication", US patent 2,632,058,
    /// 1953; from memory): step `k` flips bit `trailing_zeros(k)`.
    pub(crate) fn enumerate(&self, keep: usize) -> Table {
        let n = self.len();
        debug_assert!(n < 32);
        let mut acc = vec![Accumulator::new(); n + 1];
        let total: u64 = 1u64 << n;
        // With no more states than are kept, every one is kept: one list, no heaps (the
        // common case of a few sites). The reader sorts them, so their order is free.
        let keep_all = total <= keep as u64;
        let mut all: Vec<Candidate> = Vec::with_capacity(if keep_all { total as usize } else { 0 });
        let mut heaps: Vec<BinaryHeap<Candidate>> = if keep_all {
            Vec::new()
        } else {
            vec![BinaryHeap::with_capacity(keep + 1); n + 1]
        };
        // Local fields: change of log weight when site i goes from neutral to charged, given
        // the other sites; a base going charged also regains the proton its neutral form
        // had lost, which `state_log_weight` books as +pKa.
        let mut flip_gain: Vec<f64> = (0..n)
            .map(|i| match self.kinds[i] {
                Kind::Acid => self.field[i],
                Kind::Base => self.field[i] + self.pka[i],
            })
            .collect();
        let mut mask: u32 = 0;
        let mut lw = self.state_log_weight(0);
        let mut lost = self.lost(0);
        let mut k: u64 = 0;
        loop {
            acc[lost].push(lw);
            if keep_all {
                all.push(Candidate {
                    mask,
                    log_w: lw,
                    lost,
                });
            } else if heaps[lost].len() < keep {
                let heap = &mut heaps[lost];
                heap.push(Candidate {
                    mask,
                    log_w: lw,
                    lost,
                });
            } else if let Some(weakest) = heaps[lost].peek() {
                if lw > weakest.log_w {
                    let heap = &mut heaps[lost];
                    heap.pop();
                    heap.push(Candidate {
                        mask,
                        log_w: lw,
                        lost,
                    });
                }
            }
            k += 1;
            if k == total {
                break;
            }
            let i = k.trailing_zeros() as usize;
            let bit = 1u32 << i;
            let row = &self.w[i * n..(i + 1) * n];
            if mask & bit == 0 {
                lw += flip_gain[i];
                for (g, &wij) in flip_gain.iter_mut().zip(row) {
                    *g -= wij;
                }
                lost = match self.kinds[i] {
                    Kind::Acid => lost + 1,
                    Kind::Base => lost - 1,
                };
            } else {
                for (g, &wij) in flip_gain.iter_mut().zip(row) {
                    *g += wij;
                }
                lw -= flip_gain[i];
                lost = match self.kinds[i] {
                    Kind::Acid => lost - 1,
                    Kind::Base => lost + 1,
                };
            }
            mask ^= bit;
            // Incremental sums drift by rounding; resetting now and then bounds the drift.
            if k & 0xfff == 0 {
                lw = self.state_log_weight(mask);
                for (j, g) in flip_gain.iter_mut().enumerate() {
                    *g = match self.kinds[j] {
                        Kind::Acid => self.field[j],
                        Kind::Base => self.field[j] + self.pka[j],
                    };
                    for l in 0..n {
                        if mask >> l & 1 == 1 {
                            *g -= self.w[j * n + l];
                        }
                    }
                }
            }
        }
        let log_g = acc.iter().map(Accumulator::log10).collect();
        let candidates = if keep_all {
            all
        } else {
            heaps.into_iter().flat_map(BinaryHeap::into_vec).collect()
        };
        Table { log_g, candidates }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn group(kinds: &[Kind], pka: &[f64], w: Vec<f64>) -> Group {
        let field = kinds
            .iter()
            .zip(pka)
            .map(|(k, &p)| match k {
                Kind::Acid => -p,
                Kind::Base => 0.0,
            })
            .collect();
        Group {
            sites: (0..kinds.len()).collect(),
            kinds: kinds.to_vec(),
            field,
            w,
            bases: kinds.iter().filter(|&&k| k == Kind::Base).count(),
            pka: pka.to_vec(),
        }
    }

    #[test]
    fn long_runs_stay_exact_across_resets() {
        // 2^14 states: several periodic resets of the incremental sums.
        let n = 14;
        let kinds: Vec<Kind> = (0..n)
            .map(|i| if i % 3 == 0 { Kind::Base } else { Kind::Acid })
            .collect();
        let pka: Vec<f64> = (0..n).map(|i| 2.0 + 0.77 * i as f64).collect();
        let mut w = vec![0.0; n * n];
        for i in 0..n {
            for j in 0..n {
                if i != j {
                    w[i * n + j] = 1.3 / (1.0 + (i as f64 - j as f64).abs()) - 0.2;
                }
            }
        }
        let g = group(&kinds, &pka, w);
        let t = g.enumerate(1 << n);
        assert_eq!(t.candidates.len(), 1 << n);
        let mut by_lost = vec![Vec::new(); n + 1];
        for c in &t.candidates {
            assert!(
                (c.log_w - g.state_log_weight(c.mask)).abs() < 1e-9,
                "mask {:b}",
                c.mask
            );
            by_lost[c.lost].push(c.log_w);
        }
        for (p, v) in by_lost.iter().enumerate() {
            let direct = crate::logsum::sum(v.iter().copied());
            assert!((t.log_g[p] - direct).abs() < 1e-9, "p {p}");
        }
    }

    #[test]
    fn incremental_weights_match_direct_evaluation() {
        let kinds = [Kind::Acid, Kind::Base, Kind::Acid, Kind::Base, Kind::Base];
        let pka = [3.1, 9.4, 4.7, 10.2, 6.0];
        let n = kinds.len();
        let mut w = vec![0.0; n * n];
        for i in 0..n {
            for j in 0..n {
                if i != j {
                    w[i * n + j] = 0.3 + 0.1 * (i + j) as f64;
                }
            }
        }
        let g = group(&kinds, &pka, w);
        let t = g.enumerate(1 << n);
        assert_eq!(t.candidates.len(), 1 << n);
        for c in &t.candidates {
            assert!(
                (c.log_w - g.state_log_weight(c.mask)).abs() < 1e-12,
                "mask {:b}",
                c.mask
            );
            assert_eq!(c.lost, g.lost(c.mask));
        }
    }
}

//! Invariants of the microstate model, over random systems.

use proptest::prelude::*;
use speciation::{speciate, Kind, Microstates, SiteInput, System, MAX_SPECIES, MIN_FRACTION};

fn z(k: Kind) -> f64 {
    match k {
        Kind::Acid => -1.0,
        Kind::Base => 1.0,
    }
}

/// Random systems of 1..=max sites. With `physical`, couplings have the sign of the charge
/// product (like charges repel), which is what electrostatics gives.
fn system(max: usize, physical: bool) -> impl Strategy<Value = System> {
    (1..=max)
        .prop_flat_map(move |n| {
            (
                prop::collection::vec((any::<bool>(), -2.0f64..16.0), n),
                prop::collection::vec(if physical { 0.0f64..2.5 } else { -2.5f64..2.5 }, n * n),
                -2i32..=2,
            )
        })
        .prop_map(move |(sites, raw, base_charge)| {
            let n = sites.len();
            let sites: Vec<SiteInput> = sites
                .into_iter()
                .map(|(acid, pka)| SiteInput {
                    kind: if acid { Kind::Acid } else { Kind::Base },
                    pka,
                })
                .collect();
            let mut w = vec![vec![0.0; n]; n];
            for i in 0..n {
                for j in (i + 1)..n {
                    let v = raw[i * n + j];
                    let v = if physical {
                        v * z(sites[i].kind) * z(sites[j].kind)
                    } else {
                        v
                    };
                    w[i][j] = v;
                    w[j][i] = v;
                }
            }
            System {
                sites,
                interaction: w,
                base_charge,
            }
        })
}

fn all_states(n: usize) -> impl Iterator<Item = Vec<bool>> {
    (0u32..1 << n).map(move |m| (0..n).map(|i| m >> i & 1 == 1).collect())
}

/// The model of the crate docs, written out directly: log10 weight of one microstate.
fn direct_log_weight(s: &System, x: &[bool], ph: f64) -> f64 {
    let mut lw = 0.0;
    for (i, site) in s.sites.iter().enumerate() {
        if x[i] {
            lw += match site.kind {
                Kind::Acid => ph - site.pka,
                Kind::Base => site.pka - ph,
            };
            for (j, &xj) in x.iter().enumerate().skip(i + 1) {
                if xj {
                    lw -= s.interaction[i][j];
                }
            }
        }
    }
    lw
}

fn direct_charge(s: &System, x: &[bool]) -> f64 {
    let mut c = f64::from(s.base_charge);
    for (i, site) in s.sites.iter().enumerate() {
        if x[i] {
            c += z(site.kind);
        }
    }
    c
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]

    #[test]
    fn fractions_of_all_microstates_sum_to_one(s in system(7, false), ph in -2.0f64..16.0) {
        let m = Microstates::new(&s).unwrap();
        let total: f64 = all_states(s.sites.len()).map(|x| m.fraction(&x, ph)).sum();
        prop_assert!((total - 1.0).abs() < 1e-9, "sum {total}");
    }

    #[test]
    fn clustered_fractions_also_sum_to_one(s in system(7, false), ph in -2.0f64..16.0, cap in 1usize..4) {
        let m = Microstates::with_max_cluster(&s, cap).unwrap();
        let total: f64 = all_states(s.sites.len()).map(|x| m.fraction(&x, ph)).sum();
        prop_assert!((total - 1.0).abs() < 1e-9, "sum {total}");
    }

    #[test]
    fn matches_direct_evaluation_of_the_model(s in system(6, false), ph in -2.0f64..16.0) {
        let m = Microstates::new(&s).unwrap();
        let weights: Vec<(Vec<bool>, f64)> =
            all_states(s.sites.len()).map(|x| { let w = direct_log_weight(&s, &x, ph); (x, w) }).collect();
        let top = weights.iter().map(|p| p.1).fold(f64::NEG_INFINITY, f64::max);
        let z: f64 = weights.iter().map(|p| 10f64.powf(p.1 - top)).sum();
        let mut charge = 0.0;
        for (x, w) in &weights {
            let f = 10f64.powf(w - top) / z;
            prop_assert!((m.fraction(x, ph) - f).abs() < 1e-9, "state {x:?}: {} vs {f}", m.fraction(x, ph));
            charge += f * direct_charge(&s, x);
        }
        prop_assert!((m.charge(ph) - charge).abs() < 1e-9);
    }

    #[test]
    fn monoprotic_species_equal_at_pka(acid in any::<bool>(), pka in -1.0f64..15.0) {
        let kind = if acid { Kind::Acid } else { Kind::Base };
        let s = System { sites: vec![SiteInput { kind, pka }], interaction: vec![], base_charge: 0 };
        let r = speciate(&s, pka);
        prop_assert_eq!(r.species.len(), 2);
        prop_assert!((r.species[0].fraction - 0.5).abs() < 1e-12);
        prop_assert!((r.species[1].fraction - 0.5).abs() < 1e-12);
        prop_assert!((r.macro_pka[0] - pka).abs() < 1e-12);
    }

    #[test]
    fn charge_falls_with_ph(s in system(8, false)) {
        let m = Microstates::new(&s).unwrap();
        let mut last = f64::INFINITY;
        for i in 0..=180 {
            let c = m.charge(-2.0 + i as f64 * 0.1);
            prop_assert!(c <= last + 1e-12, "charge rose to {c} from {last} at step {i}");
            last = c;
        }
    }

    #[test]
    fn stepwise_constants_ascend_for_electrostatic_couplings(s in system(8, true)) {
        let m = Microstates::new(&s).unwrap();
        prop_assert!(m.macro_pka().windows(2).all(|p| p[0] <= p[1]));
        // Not reordered: the sorting fallback for cooperative systems was not needed.
        prop_assert_eq!(m.method(), "exact");
    }

    #[test]
    fn macro_constants_reproduce_the_charge_curve(s in system(8, true), ph in -2.0f64..16.0) {
        // Binding polynomial rebuilt from the stepwise constants alone.
        let m = Microstates::new(&s).unwrap();
        let logs: Vec<f64> = std::iter::once(0.0)
            .chain(m.macro_pka().iter().scan(0.0, |acc, pk| { *acc += ph - pk; Some(*acc) }))
            .collect();
        let top = logs.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        let zsum: f64 = logs.iter().map(|l| 10f64.powf(l - top)).sum();
        let mean_lost: f64 = logs.iter().enumerate().map(|(p, l)| p as f64 * 10f64.powf(l - top) / zsum).sum();
        let bases = s.sites.iter().filter(|x| x.kind == Kind::Base).count() as f64;
        let charge = f64::from(s.base_charge) + bases - mean_lost;
        prop_assert!((m.charge(ph) - charge).abs() < 1e-8, "{} vs {charge}", m.charge(ph));
    }

    #[test]
    fn isoelectric_point_has_zero_charge(s in system(8, false)) {
        let m = Microstates::new(&s).unwrap();
        match m.isoelectric_point() {
            Some(pi) => {
                prop_assert!((-2.0..=16.0).contains(&pi));
                prop_assert!(m.charge(pi).abs() < 1e-6, "charge {} at pI {pi}", m.charge(pi));
            }
            None => {
                let (a, b) = (m.charge(-2.0), m.charge(16.0));
                // Charges within 1e-9 of 0 at an end of the range count as neutral there.
                prop_assert!(!(a > 1e-9 && b < -1e-9), "charge crosses zero: {a} to {b}");
            }
        }
    }

    #[test]
    fn listed_species_follow_the_rules(s in system(10, false), ph in -2.0f64..16.0) {
        let m = Microstates::new(&s).unwrap();
        let r = m.speciation(ph).unwrap();
        prop_assert!(!r.species.is_empty() && r.species.len() <= MAX_SPECIES);
        for (i, sp) in r.species.iter().enumerate() {
            if i > 0 {
                prop_assert!(sp.fraction >= MIN_FRACTION);
                prop_assert!(sp.fraction <= r.species[i - 1].fraction);
            }
            // Two evaluation orders of the same log-sum-exp over up to 1,024 microstates:
            // they agree to rounding (a case at pH 15.5 differed by 1.0e-12), not bit for bit.
            let direct = m.fraction(&sp.charged, ph);
            prop_assert!(
                (sp.fraction - direct).abs() < 1e-9,
                "{} vs {direct} at pH {ph}",
                sp.fraction
            );
            prop_assert_eq!(f64::from(sp.charge), direct_charge(&s, &sp.charged));
        }
        let listed: f64 = r.species.iter().map(|x| x.fraction).sum();
        prop_assert!(listed <= 1.0 + 1e-12);
        prop_assert!((listed + r.omitted_fraction() - 1.0).abs() < 1e-12);
    }

    #[test]
    fn equivalent_sites_get_statistical_factors(n in 1usize..=8, p in 0.0f64..14.0) {
        // n identical independent acid sites: K_k = K (n - k + 1) / k.
        let s = System { sites: vec![SiteInput { kind: Kind::Acid, pka: p }; n], interaction: vec![], base_charge: 0 };
        let m = Microstates::new(&s).unwrap();
        for (k0, pk) in m.macro_pka().iter().enumerate() {
            let k = (k0 + 1) as f64;
            let expect = p - ((n as f64 - k + 1.0) / k).log10();
            prop_assert!((pk - expect).abs() < 1e-9, "k {k}: {pk} vs {expect}");
        }
    }

    #[test]
    fn site_order_does_not_matter(s in system(6, false), ph in -2.0f64..16.0) {
        let n = s.sites.len();
        let perm: Vec<usize> = (0..n).rev().collect();
        let t = System {
            sites: perm.iter().map(|&i| s.sites[i]).collect(),
            interaction: perm.iter().map(|&i| perm.iter().map(|&j| s.interaction[i][j]).collect()).collect(),
            base_charge: s.base_charge,
        };
        let (a, b) = (Microstates::new(&s).unwrap(), Microstates::new(&t).unwrap());
        prop_assert!((a.charge(ph) - b.charge(ph)).abs() < 1e-9);
        for (x, y) in a.macro_pka().iter().zip(b.macro_pka()) {
            prop_assert!((x - y).abs() < 1e-9);
        }
    }

    #[test]
    fn never_panics_on_any_numbers(
        pkas in prop::collection::vec(prop_oneof![any::<f64>(), -20.0f64..20.0], 0..5),
        rows in prop::collection::vec(prop::collection::vec(prop_oneof![any::<f64>(), -3.0f64..3.0], 0..5), 0..5),
        ph in any::<f64>(),
    ) {
        let s = System {
            sites: pkas.iter().map(|&pka| SiteInput { kind: Kind::Acid, pka }).collect(),
            interaction: rows,
            base_charge: 0,
        };
        let r = speciate(&s, ph);
        prop_assert!(r.method == "exact" || r.method.starts_with("invalid input: "), "{}", r.method);
    }
}

#[test]
fn weak_cross_couplings_cost_little_when_split() {
    // 12 sites in two tight groups of 6, coupled to each other by 0.02 pK units: splitting
    // at 6 ignores only those, so the charge moves by far less than one site's worth.
    let n = 12;
    let sites: Vec<SiteInput> = (0..n)
        .map(|i| SiteInput {
            kind: if i % 2 == 0 { Kind::Acid } else { Kind::Base },
            pka: 3.0 + i as f64 * 0.7,
        })
        .collect();
    let mut w = vec![vec![0.0; n]; n];
    for i in 0..n {
        for j in 0..n {
            if i != j {
                let same = (i < 6) == (j < 6);
                w[i][j] = if same { 0.9 } else { 0.02 } * z(sites[i].kind) * z(sites[j].kind);
            }
        }
    }
    let s = System {
        sites,
        interaction: w,
        base_charge: 0,
    };
    let exact = Microstates::new(&s).unwrap();
    let split = Microstates::with_max_cluster(&s, 6).unwrap();
    assert_eq!(exact.method(), "exact");
    assert!(
        split.method().starts_with("clusters of 6+6 sites"),
        "{}",
        split.method()
    );
    assert!(
        split
            .method()
            .contains("36 couplings ignored, largest |w| 0.020 pK"),
        "{}",
        split.method()
    );
    let mut worst: f64 = 0.0;
    for i in 0..=140 {
        let ph = i as f64 * 0.1;
        worst = worst.max((exact.charge(ph) - split.charge(ph)).abs());
    }
    // 36 couplings of 0.02: a loose bound on the charge error is well under 0.2.
    assert!(worst < 0.2, "largest charge difference {worst}");
    assert!(
        worst > 0.0,
        "the split must differ from the exact answer somewhere"
    );
}

#[test]
fn forty_and_two_hundred_sites_finish() {
    for n in [40, 200] {
        let sites: Vec<SiteInput> = (0..n)
            .map(|i| SiteInput {
                kind: if i % 2 == 0 { Kind::Acid } else { Kind::Base },
                pka: 4.0 + (i % 7) as f64,
            })
            .collect();
        let w: Vec<Vec<f64>> = (0..n)
            .map(|i| {
                (0..n)
                    .map(|j| {
                        if i == j {
                            0.0
                        } else {
                            0.8 / (i as f64 - j as f64).abs() * z(sites[i].kind) * z(sites[j].kind)
                        }
                    })
                    .collect()
            })
            .collect();
        let s = System {
            sites,
            interaction: w,
            base_charge: 0,
        };
        let r = speciate(&s, 7.4);
        assert!(r.method.starts_with("clusters of 16+"), "{}", r.method);
        assert_eq!(r.macro_pka.len(), n);
        assert!(r.charge_at_ph.is_finite());
        assert!(!r.species.is_empty());
        assert_eq!(r.species[0].charged.len(), n);
    }
}

#[test]
fn largest_accepted_system_finishes_and_one_more_is_refused() {
    let site = SiteInput {
        kind: Kind::Acid,
        pka: 7.0,
    };
    let s = System {
        sites: vec![site; speciation::MAX_SITES],
        interaction: vec![],
        base_charge: 0,
    };
    let r = speciation::try_speciate(&s, 7.0).unwrap();
    // Uncoupled sites are independent groups: still exact.
    assert_eq!(r.method, "exact");
    assert!((r.charge_at_ph + speciation::MAX_SITES as f64 / 2.0).abs() < 1e-6);
    // Every microstate has fraction 2^-1024 here: only the single most abundant is listed.
    assert_eq!(r.species.len(), 1);
    let s = System {
        sites: vec![site; speciation::MAX_SITES + 1],
        interaction: vec![],
        base_charge: 0,
    };
    assert_eq!(
        speciation::try_speciate(&s, 7.0).unwrap_err().to_string(),
        "1025 sites given; at most 1024 are accepted"
    );
}

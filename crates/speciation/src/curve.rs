//! Charge and species fractions over a pH range.

use serde::Serialize;

use crate::microstates::check_ph;
use crate::{Microstates, SpeciationError, System, MAX_SPECIES};

/// Most points in one curve.
pub const MAX_POINTS: usize = 100_000;

/// A microspecies followed along a curve.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct CurveSpecies {
    /// Per site: whether it is in its charged form.
    pub charged: Vec<bool>,
    /// Net charge.
    pub charge: i32,
}

/// One pH of a curve.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct CurvePoint {
    /// pH.
    pub ph: f64,
    /// Mean net charge over all microstates.
    pub charge: f64,
    /// Fraction of each species of [`Curve::species`], same order.
    pub fractions: Vec<f64>,
    /// Fraction in all microstates not followed (`1 - sum(fractions)`, never negative).
    pub other: f64,
}

/// Charge and fractions of a fixed list of microspecies over a pH range.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Curve {
    /// The species followed.
    pub species: Vec<CurveSpecies>,
    /// The points, ascending pH.
    pub points: Vec<CurvePoint>,
    /// How it was computed (as [`crate::Speciation::method`]).
    pub method: String,
}

/// A curve from `from` to `to` in steps of `step`, following the microspecies that are
/// listed (see the crate docs, "Species reported") at one or more of its points, at most
/// [`MAX_SPECIES`] of them (those reaching the highest fraction), ordered by the pH where
/// each peaks.
pub fn curve(system: &System, from: f64, to: f64, step: f64) -> Result<Curve, SpeciationError> {
    Microstates::new(system)?.curve(from, to, step)
}

/// The pH values `from, from + step, ...` up to `to` (included when it falls on the grid,
/// within a millionth of a step).
pub fn grid(from: f64, to: f64, step: f64) -> Result<Vec<f64>, SpeciationError> {
    let bad = |reason| SpeciationError::BadRange {
        from,
        to,
        step,
        reason,
    };
    check_ph(from).map_err(|_| bad("the start is not a usable pH"))?;
    check_ph(to).map_err(|_| bad("the end is not a usable pH"))?;
    if !(step.is_finite() && step > 0.0) {
        return Err(bad("the step must be a positive number"));
    }
    if to < from {
        return Err(bad("the end is below the start"));
    }
    let count = ((to - from) / step * (1.0 + 1e-12) + 1e-6).floor() + 1.0;
    if count > MAX_POINTS as f64 {
        return Err(bad("too many points (at most 100000)"));
    }
    // Multiplying rather than adding keeps grid values free of accumulated rounding.
    Ok((0..count as usize)
        .map(|i| from + i as f64 * step)
        .collect())
}

impl Microstates {
    /// As [`curve`], on a prepared system.
    pub fn curve(&self, from: f64, to: f64, step: f64) -> Result<Curve, SpeciationError> {
        let phs = grid(from, to, step)?;
        // charged pattern -> (charge, highest fraction, pH of it)
        let mut seen: Vec<(Vec<bool>, i32, f64, f64)> = Vec::new();
        for &ph in &phs {
            for s in self.species(ph) {
                match seen.iter_mut().find(|e| e.0 == s.charged) {
                    Some(e) if s.fraction > e.2 => {
                        e.2 = s.fraction;
                        e.3 = ph;
                    }
                    Some(_) => {}
                    None => seen.push((s.charged, s.charge, s.fraction, ph)),
                }
            }
        }
        seen.sort_by(|a, b| b.2.total_cmp(&a.2));
        seen.truncate(MAX_SPECIES);
        seen.sort_by(|a, b| a.3.total_cmp(&b.3).then(b.2.total_cmp(&a.2)));
        let species: Vec<CurveSpecies> = seen
            .into_iter()
            .map(|(charged, charge, _, _)| CurveSpecies { charged, charge })
            .collect();
        Ok(self.curve_over(species, &phs))
    }

    /// Charge and fractions of the given microspecies from `from` to `to` in steps of
    /// `step`. A species whose `charged` list does not have one entry per site gets
    /// fraction 0.
    pub fn curve_for(
        &self,
        species: Vec<CurveSpecies>,
        from: f64,
        to: f64,
        step: f64,
    ) -> Result<Curve, SpeciationError> {
        let phs = grid(from, to, step)?;
        Ok(self.curve_over(species, &phs))
    }

    fn curve_over(&self, species: Vec<CurveSpecies>, phs: &[f64]) -> Curve {
        let points = phs
            .iter()
            .map(|&ph| {
                let fractions: Vec<f64> = species
                    .iter()
                    .map(|s| self.fraction(&s.charged, ph))
                    .collect();
                let other = (1.0 - fractions.iter().sum::<f64>()).max(0.0);
                CurvePoint {
                    ph,
                    charge: self.charge(ph),
                    fractions,
                    other,
                }
            })
            .collect();
        Curve {
            species,
            points,
            method: self.method().to_string(),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn curve_follows_given_species_and_accounts_for_the_rest() {
        use crate::{Kind, SiteInput};
        let system = System {
            sites: vec![
                SiteInput {
                    kind: Kind::Acid,
                    pka: 4.0,
                },
                SiteInput {
                    kind: Kind::Acid,
                    pka: 6.0,
                },
            ],
            interaction: vec![],
            base_charge: 0,
        };
        let m = Microstates::new(&system).unwrap();
        let only = vec![CurveSpecies {
            charged: vec![false, false],
            charge: 0,
        }];
        let c = m.curve_for(only, 4.0, 6.0, 1.0).unwrap();
        assert_eq!(c.points.len(), 3);
        // At pH 4: weights 1, 1, 1e-2, 1e-2 (both charged): neutral share 1 / 2.01.
        let f = 1.0 / (1.0 + 1.0 + 0.01 + 0.01);
        assert!((c.points[0].fractions[0] - f).abs() < 1e-12);
        assert!((c.points[0].other - (1.0 - f)).abs() < 1e-12);
        // The automatic list covers all four microstates here, ordered by where each peaks.
        let auto = m.curve(0.0, 10.0, 0.5).unwrap();
        assert_eq!(auto.species.len(), 4);
        assert_eq!(auto.species[0].charged, vec![false, false]);
        assert_eq!(auto.species[3].charged, vec![true, true]);
    }

    #[test]
    fn grid_includes_end_on_the_grid() {
        let g = grid(0.0, 14.0, 0.1).unwrap();
        assert_eq!(g.len(), 141);
        assert!((g[140] - 14.0).abs() < 1e-9);
        assert_eq!(grid(2.0, 2.0, 0.5).unwrap(), vec![2.0]);
    }

    #[test]
    fn bad_ranges_are_refused_with_reason() {
        assert_eq!(
            grid(0.0, 14.0, 0.0).unwrap_err().to_string(),
            "pH range from 0 to 14 step 0: the step must be a positive number"
        );
        assert_eq!(
            grid(14.0, 0.0, 1.0).unwrap_err().to_string(),
            "pH range from 14 to 0 step 1: the end is below the start"
        );
        assert!(grid(0.0, 14.0, 1e-9).is_err());
        assert!(grid(f64::NAN, 14.0, 1.0).is_err());
    }
}

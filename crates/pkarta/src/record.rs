use serde::Serialize;

/// Options of one estimate.
#[derive(Clone, Debug)]
pub struct Options {
    /// pH for species and charge.
    pub ph: f64,
}

impl Default for Options {
    fn default() -> Self {
        Options { ph: 7.4 }
    }
}

/// An error record.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct ErrorReport {
    /// What is wrong and where (with a caret line under the bad part of the input).
    pub message: String,
}

/// A site in the output.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct SiteReport {
    /// Atom index in the input SMILES (0-based, in the order atoms are written).
    pub atom: usize,
    /// `acid` or `base`.
    pub kind: model::Kind,
    /// pKa of the protonated form at this site.
    pub pka: f64,
    /// One standard deviation.
    pub uncertainty: f64,
    /// Equivalent sites share a group.
    pub group: usize,
    /// Class id.
    pub class: String,
    /// Class name.
    pub class_name: String,
    /// How the estimate was built.
    pub terms: Vec<model::Term>,
}

/// A species in the output.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct SpeciesReport {
    /// The microspecies as SMILES.
    pub smiles: String,
    /// Its net charge.
    pub charge: i32,
    /// Its fraction at the pH.
    pub fraction: f64,
}

/// One output record of `predict`.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct Record {
    /// The input line's SMILES text.
    pub input: String,
    /// The name or id given with it.
    pub id: Option<String>,
    /// The parent used, as SMILES.
    pub smiles: Option<String>,
    /// Sites inside the aqueous window.
    pub sites: Vec<SiteReport>,
    /// Sites found whose estimate falls outside the aqueous window (-2 to 16).
    pub sites_outside_window: Vec<SiteReport>,
    /// Macroscopic constants, ascending.
    pub macro_pka: Vec<f64>,
    /// The pH of `charge_at_ph` and `species`.
    pub ph: f64,
    /// Mean net charge at the pH.
    pub charge_at_ph: Option<f64>,
    /// Species at the pH, most abundant first.
    pub species: Vec<SpeciesReport>,
    /// Isoelectric point, where there is one.
    pub isoelectric_point: Option<f64>,
    /// Warnings.
    pub warnings: Vec<String>,
    /// The error, for a record that failed.
    pub error: Option<ErrorReport>,
}

/// Estimates one input with the built-in fragment library. Never panics on input; a
/// failure is a record with `error` set.
///
/// ```
/// let record = pkarta::estimate("CC(=O)O", Some("acetic acid"), &pkarta::Options::default());
/// assert!(record.error.is_none());
/// assert_eq!(record.sites.len(), 1);
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn estimate(input: &str, id: Option<&str>, options: &Options) -> Record {
    estimate_with(model::Library::builtin(), input, id, options)
}

/// Estimates one input with a given fragment library (a user's own, or the calibration
/// program's trial values).
pub fn estimate_with(
    library: &model::Library,
    input: &str,
    id: Option<&str>,
    options: &Options,
) -> Record {
    let mut record = Record {
        input: input.to_string(),
        id: id.map(str::to_string),
        smiles: None,
        sites: Vec::new(),
        sites_outside_window: Vec::new(),
        macro_pka: Vec::new(),
        ph: options.ph,
        charge_at_ph: None,
        species: Vec::new(),
        isoelectric_point: None,
        warnings: Vec::new(),
        error: None,
    };
    match analyze(library, input) {
        Ok(mut analysis) => {
            let at_ph = analysis.speciate(options.ph);
            record.warnings = analysis.warnings();
            record.warnings.extend(cautions(&analysis.sites));
            // Each site's texts and terms move into its report: nothing reads them after this.
            let mut sites = std::mem::take(&mut analysis.sites);
            // Sized up front, as the other lists of the record: growing them one push at a
            // time cost more than filling them.
            record.sites = Vec::with_capacity(analysis.window.len());
            record.sites_outside_window = Vec::with_capacity(sites.len() - analysis.window.len());
            for site in &mut sites {
                let report = analysis.report_taking_terms(site);
                if site.in_window {
                    record.sites.push(report);
                } else {
                    record.sites_outside_window.push(report);
                }
            }
            // Coupling can push a constant past what water allows (the C-H of a malonate
            // dianion); those are not observable and are left out.
            let (low, high) = model::AQUEOUS_WINDOW;
            record.macro_pka = Vec::with_capacity(at_ph.macro_pka.len());
            record.macro_pka.extend(
                at_ph
                    .macro_pka
                    .iter()
                    .copied()
                    .filter(|p| (low..=high).contains(p)),
            );
            record.charge_at_ph = Some(at_ph.charge_at_ph);
            record.isoelectric_point = at_ph.isoelectric_point;
            analysis.sites = sites;
            // One walk of the parent serves its own SMILES and every species'.
            let writer = mol::SmilesWriter::new(&analysis.parent);
            record.smiles = Some(writer.write(&[]));
            record.species = at_ph
                .species
                .iter()
                .map(|sp| SpeciesReport {
                    smiles: writer.write(&analysis.species_edits(&sp.charged)),
                    charge: sp.charge,
                    fraction: sp.fraction,
                })
                .collect();
            if at_ph.method != "exact" {
                record
                    .warnings
                    .push(format!("speciation: {}", at_ph.method));
            }
        }
        Err(e) => record.error = Some(e),
    }
    record
}

/// Cautions carried in the output where an estimate could guide lab work.
fn cautions(sites: &[model::Site]) -> Vec<String> {
    let mut out = Vec::new();
    if let Some(s) = sites
        .iter()
        .filter(|s| s.kind == model::Kind::Acid && s.in_window)
        .min_by(|a, b| a.pka.total_cmp(&b.pka))
    {
        if s.pka < 1.0 {
            out.push(format!(
                "caution: strong acid site (estimated pKa {:.1}); an estimate, not a measurement: handle and choose reagents by measured data, local safety rules and licensed practice",
                s.pka
            ));
        }
    }
    if let Some(s) = sites
        .iter()
        .filter(|s| s.kind == model::Kind::Base && s.in_window)
        .max_by(|a, b| a.pka.total_cmp(&b.pka))
    {
        if s.pka > 12.0 {
            out.push(format!(
                "caution: strong base site (estimated conjugate-acid pKa {:.1}); an estimate, not a measurement: handle and choose reagents by measured data, local safety rules and licensed practice",
                s.pka
            ));
        }
    }
    out
}

/// One molecule carried through reading, standardizing, site finding and scoring.
pub(crate) struct Analysis {
    pub(crate) parent: mol::Molecule,
    pub(crate) origin: Vec<usize>,
    /// The components set aside by standardizing, as SMILES.
    pub(crate) others: Vec<String>,
    /// What standardizing changed, in words.
    pub(crate) changes: Vec<String>,
    pub(crate) found: Vec<model::FoundSite>,
    pub(crate) sites: Vec<model::Site>,
    /// Indices into `sites` of the sites inside the aqueous window, which speciation uses.
    pub(crate) window: Vec<usize>,
    /// Indices into `sites` of the sites charged at every pH (beyond the window's strong end).
    pub(crate) fixed: Vec<usize>,
    pub(crate) system: speciation::System,
}

pub(crate) fn analyze(library: &model::Library, input: &str) -> Result<Analysis, ErrorReport> {
    let molecule = mol::parse(input).map_err(|e| ErrorReport {
        message: e.to_string(),
    })?;
    // Taken, not borrowed: a molecule that needs no standardizing becomes the parent
    // without a copy.
    let mol::Standardized {
        parent,
        origin,
        others,
        changes,
    } = mol::standardize_owned(molecule).map_err(|e| ErrorReport {
        message: e.to_string(),
    })?;
    let found = model::find_sites(library, &parent);
    let sites = model::score_sites(library, &parent, &found);
    let window: Vec<usize> = (0..sites.len()).filter(|&i| sites[i].in_window).collect();
    // Sites beyond the window on the strong side (a sulfonic acid below pKa -2, a base above
    // 16) are charged at every pH water allows: they enter as fixed charges that shift the
    // window's sites. Those beyond it on the weak side stay neutral and drop out.
    let (low, high) = model::AQUEOUS_WINDOW;
    let fixed: Vec<usize> = (0..sites.len())
        .filter(|&i| match sites[i].kind {
            model::Kind::Acid => sites[i].pka < low,
            model::Kind::Base => sites[i].pka > high,
        })
        .collect();
    // The coupled sites are most often all the sites, in order: then they are passed as
    // they are rather than copied (their terms hold long source texts).
    let all_in_order = window.len() + fixed.len() == sites.len()
        && window
            .iter()
            .chain(&fixed)
            .enumerate()
            .all(|(k, &i)| k == i);
    let copied: Vec<model::Site>;
    let coupled: &[model::Site] = if all_in_order {
        &sites
    } else {
        copied = window
            .iter()
            .chain(&fixed)
            .map(|&i| sites[i].clone())
            .collect();
        &copied
    };
    let mut w = model::interactions(library, &parent, coupled);
    let nw = window.len();
    // Fixed charges shift the window's sites (both charged: w > 0 for like charges).
    let shifts: Vec<f64> = (0..nw)
        .map(|k| (nw..coupled.len()).map(|j| w[k][j]).sum())
        .collect();
    // Without fixed sites (the common case) the matrix is the window's as it is.
    let interaction: Vec<Vec<f64>> = if nw == w.len() {
        std::mem::take(&mut w)
    } else {
        w[..nw].iter().map(|row| row[..nw].to_vec()).collect()
    };
    let fixed_charge: i32 = fixed
        .iter()
        .map(|&i| {
            if sites[i].kind == model::Kind::Acid {
                -1
            } else {
                1
            }
        })
        .sum();
    let base_charge: i32 =
        parent.atoms().iter().map(|a| a.charge as i32).sum::<i32>() + fixed_charge;
    let system = speciation::System {
        sites: window
            .iter()
            .enumerate()
            .map(|(k, &i)| {
                let s = &sites[i];
                // An acid's pKa rises by the shift, a base's falls by it.
                let shift = shifts[k];
                speciation::SiteInput {
                    kind: match s.kind {
                        model::Kind::Acid => speciation::Kind::Acid,
                        model::Kind::Base => speciation::Kind::Base,
                    },
                    pka: match s.kind {
                        model::Kind::Acid => s.pka + shift,
                        model::Kind::Base => s.pka - shift,
                    },
                }
            })
            .collect(),
        interaction,
        base_charge,
    };
    Ok(Analysis {
        parent,
        origin,
        others,
        changes,
        found,
        sites,
        window,
        fixed,
        system,
    })
}

impl Analysis {
    pub(crate) fn speciate(&self, ph: f64) -> speciation::Speciation {
        speciation::speciate(&self.system, ph)
    }

    pub(crate) fn warnings(&self) -> Vec<String> {
        // Sized to what is known here (nothing taken when there is nothing to say); a
        // caution or note added after these grows it, which is rare.
        let site_warnings: usize = self.sites.iter().map(|s| s.warnings.len()).sum();
        let mut out: Vec<String> =
            Vec::with_capacity(self.others.len() + self.changes.len() + site_warnings);
        for other in &self.others {
            out.push(format!(
                "set aside component {other} (counter-ion or solvent)"
            ));
        }
        out.extend(self.changes.iter().cloned());
        for site in &self.sites {
            for w in &site.warnings {
                // Joined by hand: `format!` costs several times as much, once for each of
                // about half the molecules.
                let mut text = String::with_capacity(36 + w.len());
                text.push_str("site at atom ");
                text.push_str(mol::decimal(self.origin[site.atom] as u64, &mut [0; 20]));
                text.push_str(": ");
                text.push_str(w);
                out.push(text);
            }
        }
        out
    }

    /// The report of a site, its texts and terms moved out of the site (only its atom and
    /// kind are read after this, to write species).
    pub(crate) fn report_taking_terms(&self, site: &mut model::Site) -> SiteReport {
        SiteReport {
            atom: self.origin[site.atom],
            kind: site.kind,
            pka: site.pka,
            uncertainty: site.uncertainty,
            group: site.group,
            class: std::mem::take(&mut site.class),
            class_name: std::mem::take(&mut site.class_name),
            terms: std::mem::take(&mut site.terms),
        }
    }

    /// The SMILES of a microspecies: each charged site gains (base) or loses (acid) a proton.
    pub(crate) fn species_smiles(&self, charged: &[bool]) -> String {
        mol::write_smiles_with_protons(&self.parent, &self.species_edits(charged))
    }

    /// The proton moves of a microspecies: each charged site of the window, and every
    /// fixed site.
    pub(crate) fn species_edits(&self, charged: &[bool]) -> Vec<(usize, i8)> {
        self.window
            .iter()
            .zip(charged)
            .filter(|(_, &c)| c)
            .map(|(&i, _)| i)
            .chain(self.fixed.iter().copied())
            .map(|i| {
                let s = &self.sites[i];
                (s.atom, if s.kind == model::Kind::Acid { -1 } else { 1 })
            })
            .collect()
    }
}

/// An atom in `inspect` output.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct InspectAtom {
    /// Element symbol.
    pub element: String,
    /// Formal charge.
    pub charge: i8,
    /// Attached implicit and bracket hydrogens.
    pub hydrogens: u8,
    /// Aromatic as perceived.
    pub aromatic: bool,
    /// In a ring.
    pub in_ring: bool,
}

/// A bond in `inspect` output.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct InspectBond {
    /// First atom.
    pub a: usize,
    /// Second atom.
    pub b: usize,
    /// Kekulé order.
    pub order: u8,
    /// Aromatic as perceived.
    pub aromatic: bool,
}

/// One output record of `inspect`.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct InspectRecord {
    /// The input text.
    pub input: String,
    /// The name given with it.
    pub id: Option<String>,
    /// Atoms, in input order.
    pub atoms: Vec<InspectAtom>,
    /// Bonds.
    pub bonds: Vec<InspectBond>,
    /// Components as atom lists.
    pub components: Vec<Vec<usize>>,
    /// The error, for a record that failed.
    pub error: Option<ErrorReport>,
}

/// Reads and perceives one input for `inspect`.
pub fn inspect(input: &str, id: Option<&str>) -> InspectRecord {
    match mol::parse(input) {
        Ok(m) => InspectRecord {
            input: input.to_string(),
            id: id.map(str::to_string),
            atoms: m
                .atoms()
                .iter()
                .map(|a| InspectAtom {
                    element: mol::element_symbol(a.element).to_string(),
                    charge: a.charge,
                    hydrogens: a.hydrogens,
                    aromatic: a.aromatic,
                    in_ring: a.ring_count > 0,
                })
                .collect(),
            bonds: m
                .bonds()
                .iter()
                .map(|b| InspectBond {
                    a: b.a,
                    b: b.b,
                    order: b.order,
                    aromatic: b.aromatic,
                })
                .collect(),
            components: m.components().to_vec(),
            error: None,
        },
        Err(e) => InspectRecord {
            input: input.to_string(),
            id: id.map(str::to_string),
            atoms: Vec::new(),
            bonds: Vec::new(),
            components: Vec::new(),
            error: Some(ErrorReport {
                message: e.to_string(),
            }),
        },
    }
}

/// A site as the pattern found it, before scoring (`pkarta debug sites`).
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct DebugSite {
    /// Atom index in the input.
    pub atom: usize,
    /// Class id.
    pub class: String,
    /// Class name.
    pub class_name: String,
    /// Acid or base.
    pub kind: model::Kind,
    /// The pattern text.
    pub pattern: String,
    /// Input atom indices matched, per pattern atom.
    pub matched: Vec<usize>,
    /// Symmetry group.
    pub group: usize,
}

/// Finds sites without scoring them.
pub fn debug_sites(input: &str) -> Result<Vec<DebugSite>, ErrorReport> {
    let library = model::Library::builtin();
    let a = analyze(library, input)?;
    Ok(a.found
        .iter()
        .map(|f| {
            let class = &library.classes[f.class];
            DebugSite {
                atom: a.origin[f.atom],
                class: class.id.clone(),
                class_name: class.name.clone(),
                kind: class.kind,
                pattern: class.pattern.clone(),
                matched: f.matched.iter().map(|&m| a.origin[m]).collect(),
                group: f.group,
            }
        })
        .collect())
}

/// One point of a speciation curve.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct CurvePoint {
    /// pH.
    pub ph: f64,
    /// Mean net charge.
    pub charge: f64,
    /// Fraction of each species of `Curve::species`, same order.
    pub fractions: Vec<f64>,
}

/// Species fractions and charge over a pH range.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct Curve {
    /// The parent used, as SMILES.
    pub smiles: String,
    /// The species followed (those listed at one or more points), most protonated first.
    pub species: Vec<SpeciesReport>,
    /// The points, ascending pH.
    pub points: Vec<CurvePoint>,
    /// The pH of interest, marked on plots.
    pub ph: f64,
    /// Isoelectric point, where there is one.
    pub isoelectric_point: Option<f64>,
    /// How the speciation was computed.
    pub method: String,
    #[serde(skip)]
    inner: speciation::Curve,
}

/// Computes a speciation curve from `from` to `to` in steps of `step`.
pub fn curve(
    input: &str,
    options: &Options,
    from: f64,
    to: f64,
    step: f64,
) -> Result<Curve, ErrorReport> {
    let a = analyze(model::Library::builtin(), input)?;
    let states = speciation::Microstates::new(&a.system).map_err(|e| ErrorReport {
        message: e.to_string(),
    })?;
    let inner = states.curve(from, to, step).map_err(|e| ErrorReport {
        message: e.to_string(),
    })?;
    let at_ph = states.speciation(options.ph).map_err(|e| ErrorReport {
        message: e.to_string(),
    })?;
    let species = inner
        .species
        .iter()
        .map(|sp| SpeciesReport {
            smiles: a.species_smiles(&sp.charged),
            charge: sp.charge,
            fraction: at_ph
                .species
                .iter()
                .find(|x| x.charged == sp.charged)
                .map_or(0.0, |x| x.fraction),
        })
        .collect();
    let points = inner
        .points
        .iter()
        .map(|p| CurvePoint {
            ph: p.ph,
            charge: p.charge,
            fractions: p.fractions.clone(),
        })
        .collect();
    Ok(Curve {
        smiles: mol::write_smiles(&a.parent),
        species,
        points,
        ph: options.ph,
        isoelectric_point: states.isoelectric_point(),
        method: inner.method.clone(),
        inner,
    })
}

/// Renders a curve as an SVG plot of species fractions against pH, with the net charge in
/// a panel below and the pH of interest marked.
pub fn plot_svg(curve: &Curve) -> String {
    let labels: Vec<String> = curve.species.iter().map(|s| s.smiles.clone()).collect();
    let options = speciation::PlotOptions {
        title: Some(curve.smiles.clone()),
        ph: Some(curve.ph),
        isoelectric_point: curve.isoelectric_point,
        ..Default::default()
    };
    speciation::svg_plot(&curve.inner, &labels, &options)
}

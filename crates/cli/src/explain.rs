//! `pkarta explain`: how each site's estimate was built, term by term.

use pkarta::{Options, Record, SiteReport};

use crate::batch;
use crate::flags::ExplainArgs;
use crate::fmt::{align, hang, num, percent, CAUTION};

/// Runs `explain`; returns whether the molecule failed.
pub fn run(args: &ExplainArgs) -> anyhow::Result<bool> {
    let options = Options { ph: args.ph.ph };
    let record = match crate::library::load(args.library.library.as_deref())? {
        Some(library) => pkarta::estimate_with(&library, &args.smiles, None, &options),
        None => pkarta::estimate(&args.smiles, None, &options),
    };
    let text = render(&record);
    batch::write_all_quiet(&mut batch::stdout(), text.as_bytes())?;
    Ok(record.error.is_some())
}

/// The explanation as text for people.
pub fn render(record: &Record) -> String {
    let mut s = format!("input   {}\n", record.input);
    if let Some(error) = &record.error {
        s.push_str(&format!("error   {}\n", hang(&error.message, "        ")));
        return s;
    }
    if let Some(parent) = &record.smiles {
        s.push_str(&format!("parent  {parent}\n"));
    }
    let elements: Vec<String> = pkarta::inspect(&record.input, None)
        .atoms
        .into_iter()
        .map(|a| a.element)
        .collect();
    if record.sites.is_empty() && record.sites_outside_window.is_empty() {
        s.push_str("\nno ionizable sites found\n");
    }
    let outside = record.sites_outside_window.iter().map(|site| (site, true));
    for (n, (site, out)) in record
        .sites
        .iter()
        .map(|site| (site, false))
        .chain(outside)
        .enumerate()
    {
        s.push('\n');
        s.push_str(&site_text(n + 1, site, out, &elements));
    }
    s.push('\n');
    let macro_pka: Vec<String> = record.macro_pka.iter().map(|&p| num(p)).collect();
    s.push_str(&format!(
        "macro pKa           {}\n",
        if macro_pka.is_empty() {
            "none".to_string()
        } else {
            macro_pka.join(", ")
        }
    ));
    s.push_str(&format!(
        "charge at pH {}  {}\n",
        num(record.ph),
        record
            .charge_at_ph
            .map(num)
            .unwrap_or_else(|| "-".to_string())
    ));
    s.push_str(&format!(
        "isoelectric point   {}\n",
        record
            .isoelectric_point
            .map(num)
            .unwrap_or_else(|| "none".to_string())
    ));
    if !record.species.is_empty() {
        s.push_str(&format!("species at pH {}:\n", num(record.ph)));
        let mut rows = vec![["fraction", "charge", "smiles"].map(String::from).to_vec()];
        for sp in &record.species {
            rows.push(vec![
                percent(sp.fraction),
                format!("{:+}", sp.charge).replace("+0", "0"),
                sp.smiles.clone(),
            ]);
        }
        s.push_str(&align(&rows, &[0, 1], "  "));
    }
    for w in &record.warnings {
        s.push_str(&format!("warning: {w}\n"));
    }
    s.push('\n');
    s.push_str(CAUTION);
    s.push('\n');
    s
}

fn site_text(n: usize, site: &SiteReport, outside: bool, elements: &[String]) -> String {
    let kind = match site.kind {
        pkarta::model::Kind::Acid => "acid",
        pkarta::model::Kind::Base => "base (pKa of the conjugate acid)",
    };
    let element = elements.get(site.atom).map(String::as_str).unwrap_or("?");
    let mut s = format!(
        "site {n}: atom {} ({element}), {kind}, {} [{}], group {}{}\n",
        site.atom,
        site.class_name,
        site.class,
        site.group,
        if outside {
            ", outside the aqueous window"
        } else {
            ""
        }
    );
    // Sources are long and often shared between terms: each is listed once, below the
    // table, and the terms point to it by number.
    let mut sources: Vec<&str> = Vec::new();
    let mut rows = vec![
        ["term", "position", "sigma", "rho", "contribution", "source"]
            .map(String::from)
            .to_vec(),
    ];
    for t in &site.terms {
        let reference = if t.source.is_empty() {
            String::new()
        } else {
            let i = sources
                .iter()
                .position(|&x| x == t.source)
                .unwrap_or_else(|| {
                    sources.push(&t.source);
                    sources.len() - 1
                });
            format!("[{}]", i + 1)
        };
        rows.push(vec![
            t.label.to_string(),
            t.position.as_deref().unwrap_or_default().to_string(),
            t.sigma.map(num).unwrap_or_default(),
            t.rho.map(num).unwrap_or_default(),
            format!("{:+.2}", t.contribution).replace("-0.00", "+0.00"),
            reference,
        ]);
    }
    let total: f64 = site.terms.iter().map(|t| t.contribution).sum();
    rows.push(vec![
        "total = estimate".into(),
        String::new(),
        String::new(),
        String::new(),
        num(total),
        String::new(),
    ]);
    s.push_str(&align(&rows, &[2, 3, 4], "  "));
    s.push_str(&format!(
        "  pKa {} +/- {} (one standard deviation)\n",
        num(site.pka),
        num(site.uncertainty)
    ));
    for (i, source) in sources.iter().enumerate() {
        s.push_str(&format!("  [{}] {source}\n", i + 1));
    }
    s
}

//! `pkarta debug ...`: views of the intermediate stages.

use pkarta::Options;

use crate::batch;
use crate::flags::DebugView;
use crate::fmt::{align, hang};

/// Runs a debug view; returns whether the molecule failed.
pub fn run(view: &DebugView) -> anyhow::Result<bool> {
    let (text, failed) = match view {
        DebugView::Graph { smiles } => {
            let record = pkarta::inspect(smiles, None);
            (crate::inspect::render(1, &record), record.error.is_some())
        }
        DebugView::Sites { smiles } => match pkarta::debug_sites(smiles) {
            Ok(sites) => {
                let mut rows = vec![["atom", "kind", "class", "group", "matched", "pattern"]
                    .map(String::from)
                    .to_vec()];
                for site in &sites {
                    rows.push(vec![
                        site.atom.to_string(),
                        serde_json::to_value(site.kind)?
                            .as_str()
                            .unwrap_or("?")
                            .to_string(),
                        site.class.clone(),
                        site.group.to_string(),
                        site.matched
                            .iter()
                            .map(usize::to_string)
                            .collect::<Vec<_>>()
                            .join(","),
                        site.pattern.clone(),
                    ]);
                }
                let mut text = format!("input  {smiles}\n");
                if sites.is_empty() {
                    text.push_str("no sites found\n");
                } else {
                    text.push_str(&align(&rows, &[0, 3], ""));
                }
                (text, false)
            }
            Err(e) => (
                format!("input  {smiles}\nerror  {}\n", hang(&e.message, "       ")),
                true,
            ),
        },
        DebugView::Terms { smiles, ph } => {
            let record = pkarta::estimate(smiles, None, &Options { ph: ph.ph });
            let value = serde_json::json!({
                "input": record.input,
                "smiles": record.smiles,
                "sites": record.sites,
                "sites_outside_window": record.sites_outside_window,
                "error": record.error,
            });
            (
                serde_json::to_string_pretty(&value)? + "\n",
                record.error.is_some(),
            )
        }
    };
    batch::write_all_quiet(&mut batch::stdout(), text.as_bytes())?;
    Ok(failed)
}

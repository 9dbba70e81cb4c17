//! `--library PATH`: a user's own fragment library, a directory laid out like `fragments/`
//! (replacing the built-in library) or one TOML file of extra `[[class]]` and
//! `[[substituent]]` tables (added after the built-in ones).

use std::path::Path;

use anyhow::{bail, Context};
use pkarta::model::Library;

/// Loads the library named by `--library`, or `None` for the built-in one.
pub fn load(path: Option<&Path>) -> anyhow::Result<Option<Library>> {
    let Some(path) = path else { return Ok(None) };
    if path.is_dir() {
        let library = Library::from_dir(path)
            .with_context(|| format!("cannot load the fragment library {}", path.display()))?;
        return Ok(Some(library));
    }
    let text =
        std::fs::read_to_string(path).with_context(|| format!("cannot read {}", path.display()))?;
    let name = path.display().to_string();
    let mut table: toml::Table =
        toml::from_str(&text).with_context(|| format!("{name} is not TOML"))?;
    let classes = table.remove("class");
    let substituents = table.remove("substituent");
    if let Some(key) = table.keys().next() {
        bail!("{name}: unexpected key {key:?}; a fragment file holds [[class]] and [[substituent]] tables");
    }
    let part = |key: &str, value: Option<toml::Value>| -> anyhow::Result<String> {
        let mut t = toml::Table::new();
        if let Some(v) = value {
            t.insert(key.to_string(), v);
        }
        Ok(toml::to_string(&t)?)
    };
    let (classes, substituents) = (part("class", classes)?, part("substituent", substituents)?);
    // The user's entries are checked on their own first, so errors name their file.
    let user = Library::from_sources(&[(&name, &classes)], &[(&name, &substituents)], &[])
        .with_context(|| format!("cannot load the fragment file {name}"))?;
    let builtin = Library::builtin();
    let all_classes = builtin
        .classes
        .iter()
        .cloned()
        .chain(user.classes)
        .collect();
    let all_substituents = builtin
        .substituents
        .iter()
        .cloned()
        .chain(user.substituents)
        .collect();
    let library = Library::new(all_classes, all_substituents, builtin.calibration.clone())
        .with_context(|| format!("the entries of {name} do not fit with the built-in library"))?;
    Ok(Some(library))
}

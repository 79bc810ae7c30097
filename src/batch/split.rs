//! The proof that shard workbooks are one complete split of one run: every
//! one a shard (`run --shard K/N`, its Run sheet's `shard` setting), all read
//! from the same books (the inputs' paths, sizes and SHA-256) with the same
//! settings and the same count N, each K from 1 to N exactly once, and
//! every account row in the shard its id falls in ([`shard_of`]).
//!
//! A set that passes becomes a [`OneSplit`], the only thing
//! [`merge`](super::merge::merge) takes. This module never reads a file,
//! never looks at a figure, and never lets a set through that it cannot
//! prove: a shard given twice, a missing shard, a whole run or a shard of
//! another split is an error naming the workbooks.

use std::collections::BTreeMap;

use super::merge::MergeError;
use super::shard_of;
use crate::report::model::{InputFile, RunFacts, Setting};
use crate::report::readback::RunRows;

/// The name of the Run sheet's setting that says which shard a workbook is.
pub const SHARD_SETTING: &str = "shard";

/// Missing shards named in full, at most; the rest are counted.
const MISSING_NAMED: usize = 10;

/// One shard workbook read back, with the file it came from.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Shard {
    /// The workbook, as the command line named it.
    pub file: String,
    /// Its rows and Run sheet facts.
    pub rows: RunRows,
}

/// Shards proven to be one complete split of one run, each K once.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct OneSplit {
    /// The first shard given.
    pub(super) first: RunRows,
    /// The other shards, in the order given.
    pub(super) rest: Vec<RunRows>,
    /// Their common settings, without `shard`.
    pub(super) settings: Vec<Setting>,
}

impl OneSplit {
    /// The Run sheet facts of the first shard given (books and settings are
    /// those of every shard).
    pub fn facts(&self) -> &RunFacts {
        &self.first.facts
    }
}

/// Shard K of N as a Run sheet writes it.
///
/// ```
/// use ledgerate::batch::split::parse_shard;
/// assert_eq!(parse_shard("2/3"), Some((2, 3)));
/// assert_eq!(parse_shard("1/1"), Some((1, 1)));
/// assert_eq!(parse_shard("4/3"), None);
/// assert_eq!(parse_shard("0/3"), None);
/// assert_eq!(parse_shard("2"), None);
/// ```
pub fn parse_shard(value: &str) -> Option<(u32, u32)> {
    let (k, n) = value.split_once('/')?;
    let (k, n): (u32, u32) = (k.trim().parse().ok()?, n.trim().parse().ok()?);
    (k >= 1 && k <= n).then_some((k, n))
}

/// Checks that `shards` are one complete split of one run.
///
/// # Errors
/// [`MergeError::NoShards`] for none; [`MergeError::NotOneSplit`] listing
/// every reason the set is not one split, each naming its workbooks.
pub fn check(shards: Vec<Shard>) -> Result<OneSplit, MergeError> {
    if shards.is_empty() {
        return Err(MergeError::NoShards);
    }
    let mut found = Vec::new();
    let books = odd_ones(&shards, |s| &s.rows.facts.inputs);
    for (odd, like) in &books {
        found.push(format!(
            "{} was run on other books than {}: {}",
            odd.file,
            like.file,
            books_differ(&odd.rows.facts.inputs, &like.rows.facts.inputs, &like.file)
        ));
    }
    let settings = odd_ones(&shards, |s| without_shard(&s.rows.facts.settings));
    for (odd, like) in &settings {
        found.push(format!(
            "{} was run with other settings than {}: {}",
            odd.file,
            like.file,
            settings_differ(
                &odd.rows.facts.settings,
                &like.rows.facts.settings,
                &like.file
            )
        ));
    }
    let numbered = numbered(&shards, &mut found);
    if let Some(n) = common_count(&numbered, &mut found) {
        each_once(&numbered, n, &mut found);
        for (shard, k, _) in numbered.iter().filter(|(_, _, m)| *m == n) {
            if let Some(a) = foreign_account(&shard.rows, *k, n) {
                found.push(format!(
                    "{} is shard {k}/{n} but holds account {a}, which is in shard {}/{n}",
                    shard.file,
                    shard_of(&a, n)
                ));
            }
        }
    }
    if !found.is_empty() {
        return Err(MergeError::NotOneSplit(found));
    }
    let mut rows = shards.into_iter().map(|s| s.rows);
    let first = rows.next().ok_or(MergeError::NoShards)?;
    Ok(OneSplit {
        settings: without_shard(&first.facts.settings),
        first,
        rest: rows.collect(),
    })
}

/// Settings as the shards must share them: all but `shard`.
fn without_shard(settings: &[Setting]) -> Vec<Setting> {
    settings
        .iter()
        .filter(|s| s.name != SHARD_SETTING)
        .cloned()
        .collect()
}

/// The shards whose key differs from the most common one (the first such
/// group on a tie), each with a shard that has the common key.
fn odd_ones<'s, T: PartialEq>(
    shards: &'s [Shard],
    key: impl Fn(&'s Shard) -> T,
) -> Vec<(&'s Shard, &'s Shard)> {
    let keys: Vec<T> = shards.iter().map(&key).collect();
    let count = |k: &T| keys.iter().filter(|x| *x == k).count();
    let mut best: Option<(usize, usize)> = None;
    for (i, k) in keys.iter().enumerate() {
        let c = count(k);
        if best.is_none_or(|(_, b)| c > b) {
            best = Some((i, c));
        }
    }
    let Some((like, like_key)) = best.and_then(|(i, _)| Some((shards.get(i)?, keys.get(i)?)))
    else {
        return Vec::new();
    };
    shards
        .iter()
        .zip(&keys)
        .filter(|(_, k)| *k != like_key)
        .map(|(s, _)| (s, like))
        .collect()
}

/// How one shard's input books differ from another's (`like`).
fn books_differ(these: &[InputFile], those: &[InputFile], like: &str) -> String {
    let paths = |f: &[InputFile]| f.iter().map(|i| i.path.clone()).collect::<Vec<_>>();
    if paths(these) != paths(those) {
        return format!(
            "it read {} where {like} read {}",
            paths(these).join(", "),
            paths(those).join(", ")
        );
    }
    these
        .iter()
        .zip(those)
        .find(|(a, b)| a != b)
        .map(|(a, b)| {
            format!(
                "{} had SHA-256 {} ({} bytes) for it and {} ({} bytes) for {like}; run every shard on the same books",
                a.path, a.sha256, a.size, b.sha256, b.size
            )
        })
        .unwrap_or_default()
}

/// The first setting (by name) whose value or source differs.
fn settings_differ(these: &[Setting], those: &[Setting], like: &str) -> String {
    let shown = |s: &[Setting], name: &str| {
        s.iter()
            .find(|x| x.name == name)
            .map_or("no such setting".to_string(), |x| {
                format!("{} ({})", x.value, x.source.name())
            })
    };
    let names = these
        .iter()
        .chain(those)
        .map(|s| s.name.as_str())
        .filter(|n| *n != SHARD_SETTING);
    for name in names {
        let (a, b) = (shown(these, name), shown(those, name));
        if a != b {
            return format!(
                "{name} is {a} there and {b} in {like}; run every shard with the same settings"
            );
        }
    }
    String::new()
}

/// Each shard's K and N; a whole run or an unreadable `shard` value is a
/// finding.
fn numbered<'s>(shards: &'s [Shard], found: &mut Vec<String>) -> Vec<(&'s Shard, u32, u32)> {
    let mut out = Vec::new();
    for shard in shards {
        let value = shard
            .rows
            .facts
            .settings
            .iter()
            .find(|s| s.name == SHARD_SETTING)
            .map(|s| s.value.as_str());
        match value.map(|v| (v, parse_shard(v))) {
            None => found.push(format!(
                "{} is a whole run, not a shard (its Run sheet has no shard setting); merge takes the workbooks of `ledgerate run --shard K/N`",
                shard.file
            )),
            Some((v, None)) => found.push(format!(
                "{} has shard '{v}' on its Run sheet, not K/N with K from 1 to N",
                shard.file
            )),
            Some((_, Some((k, n)))) => out.push((shard, k, n)),
        }
    }
    out
}

/// The count N most shards share; each shard of another count is a
/// finding. `None` when there is no shard at all.
fn common_count(numbered: &[(&Shard, u32, u32)], found: &mut Vec<String>) -> Option<u32> {
    let mut counts: BTreeMap<u32, usize> = BTreeMap::new();
    for (_, _, n) in numbered {
        *counts.entry(*n).or_default() += 1;
    }
    // The most common N; on a tie the N of the first shard given.
    let n = numbered.iter().map(|(_, _, n)| *n).max_by_key(|n| {
        (
            counts.get(n).copied(),
            std::cmp::Reverse(first_at(numbered, *n)),
        )
    })?;
    let others: Vec<&str> = numbered
        .iter()
        .filter(|(_, _, m)| *m == n)
        .map(|(s, _, _)| s.file.as_str())
        .collect();
    for (shard, k, m) in numbered.iter().filter(|(_, _, m)| *m != n) {
        let them = match others.as_slice() {
            [one] => format!("{one} is"),
            _ => "the others are".to_string(),
        };
        found.push(format!("{} is shard {k}/{m} but {them} of {n}", shard.file));
    }
    Some(n)
}

/// Where the first shard of count `n` stands in the list.
fn first_at(numbered: &[(&Shard, u32, u32)], n: u32) -> usize {
    numbered
        .iter()
        .position(|(_, _, m)| *m == n)
        .unwrap_or(usize::MAX)
}

/// Each K of 1..=N given once: repeats and gaps are findings.
fn each_once(numbered: &[(&Shard, u32, u32)], n: u32, found: &mut Vec<String>) {
    let mut by_k: BTreeMap<u32, Vec<&str>> = BTreeMap::new();
    for (shard, k, _) in numbered.iter().filter(|(_, _, m)| *m == n) {
        by_k.entry(*k).or_default().push(&shard.file);
    }
    for (k, files) in &by_k {
        if files.len() > 1 {
            let times = match files.len() {
                2 => "twice".to_string(),
                t => format!("{t} times"),
            };
            found.push(format!("shard {k}/{n} given {times}: {}", in_words(files)));
        }
    }
    let missing_count = usize::try_from(n)
        .unwrap_or(usize::MAX)
        .saturating_sub(by_k.len());
    if missing_count == 0 {
        return;
    }
    // Walk the gaps between the shards given, never every K up to N.
    let mut named = Vec::new();
    let mut next = 1u32;
    for k in by_k
        .keys()
        .copied()
        .chain(std::iter::once(n.saturating_add(1)))
    {
        while next < k && named.len() < MISSING_NAMED {
            named.push(format!("{next}/{n}"));
            next += 1;
        }
        next = k.saturating_add(1);
        if named.len() >= MISSING_NAMED {
            break;
        }
    }
    let mut listed = in_words(&named.iter().map(String::as_str).collect::<Vec<_>>());
    if missing_count > named.len() {
        listed = format!("{listed} and {} more", missing_count - named.len());
    }
    let noun = if missing_count == 1 {
        "shard"
    } else {
        "shards"
    };
    found.push(format!("{noun} {listed} missing"));
}

/// `a`, `a and b`, `a, b and c`.
fn in_words(items: &[&str]) -> String {
    match items {
        [] => String::new(),
        [one] => (*one).to_string(),
        [rest @ .., last] => format!("{} and {last}", rest.join(", ")),
    }
}

/// The first account row of a shard that belongs to another shard.
fn foreign_account(rows: &RunRows, k: u32, n: u32) -> Option<String> {
    rows.accruals
        .iter()
        .map(|a| &a.account)
        .chain(rows.reconciliation.iter().map(|r| &r.account))
        .find(|a| shard_of(a, n) != k)
        .cloned()
}

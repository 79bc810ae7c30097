//! Account ids held once each, in one text: a list found by index
//! ([`AccountIds`], the Journal detail's accounts) and an index found by
//! the id's text ([`IdIndex`], the Accounts sheet's ids for the rows of the
//! other sheets).
//!
//! At a million accounts a map of boxed ids takes about a hundred
//! megabytes (a key and a value in each of two million slots, and an
//! allocation per id); these take the ids' characters, one offset each and,
//! for the index, one place per slot of a table by hash. They never change
//! an id, and a full list says so (`None`) rather than dropping one.

use std::fmt;
use std::hash::BuildHasher;

use hashbrown::hash_table::Entry;
use hashbrown::{DefaultHashBuilder, HashTable};

/// Account ids held once, one after another in one text, each found by its
/// index: a million ids cost their characters and one offset each.
///
/// ```
/// use ledgerate::report::model::AccountIds;
/// let mut ids = AccountIds::default();
/// let a = ids.push("HM-SAV-001").unwrap();
/// let b = ids.push("HM-LN-002").unwrap();
/// assert_eq!((ids.get(a), ids.get(b), ids.len()), ("HM-SAV-001", "HM-LN-002", 2));
/// assert_eq!(ids.last(), Some("HM-LN-002"));
/// assert_eq!(ids.get(7), "");
/// ```
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct AccountIds {
    text: String,
    /// Where each id ends in `text`.
    ends: Vec<u32>,
}

impl AccountIds {
    /// Adds an id and returns its index; `None` once [`u32::MAX`] ids, or
    /// 4 GiB of their text, are held.
    pub fn push(&mut self, id: &str) -> Option<u32> {
        let index = u32::try_from(self.ends.len())
            .ok()
            .filter(|i| *i < u32::MAX)?;
        let end = u32::try_from(self.text.len().checked_add(id.len())?).ok()?;
        self.text.push_str(id);
        self.ends.push(end);
        Some(index)
    }

    /// The id at `index` (empty for an index out of range).
    pub fn get(&self, index: u32) -> &str {
        let Ok(i) = usize::try_from(index) else {
            return "";
        };
        let at = |j: usize| self.ends.get(j).and_then(|e| usize::try_from(*e).ok());
        let start = i.checked_sub(1).and_then(at).unwrap_or(0);
        let end = at(i).unwrap_or(start);
        self.text.get(start..end).unwrap_or_default()
    }

    /// The id added last.
    pub fn last(&self) -> Option<&str> {
        let n = u32::try_from(self.ends.len().checked_sub(1)?).ok()?;
        Some(self.get(n))
    }

    /// How many ids there are.
    pub fn len(&self) -> usize {
        self.ends.len()
    }

    /// Whether there are none.
    pub fn is_empty(&self) -> bool {
        self.ends.is_empty()
    }

    /// Every id, in the order they were added.
    pub fn iter(&self) -> impl Iterator<Item = &str> + '_ {
        (0..self.ends.len())
            .map_while(|i| u32::try_from(i).ok())
            .map(|i| self.get(i))
    }
}

/// Ids held once each, in the order they first came, each found by its
/// exact text: its index is its place in that order.
///
/// ```
/// use ledgerate::ids::IdIndex;
/// let mut ids = IdIndex::with_capacity(2);
/// assert_eq!(ids.insert("ACC-1"), Some(0));
/// assert_eq!(ids.insert("ACC-2"), Some(1));
/// assert_eq!(ids.insert("ACC-1"), Some(0)); // held once
/// assert_eq!(ids.place("ACC-2"), Some(1));
/// assert_eq!(ids.place("acc-2"), None); // ids match exactly
/// assert_eq!(ids.ids().iter().collect::<Vec<_>>(), ["ACC-1", "ACC-2"]);
/// ```
#[derive(Default)]
pub struct IdIndex {
    ids: AccountIds,
    /// Places in `ids`, found by the hash of their id.
    places: HashTable<u32>,
    hasher: DefaultHashBuilder,
}

impl IdIndex {
    /// Room for `ids` ids (their text grows as it needs).
    pub fn with_capacity(ids: usize) -> IdIndex {
        IdIndex {
            ids: AccountIds {
                text: String::new(),
                ends: Vec::with_capacity(ids),
            },
            places: HashTable::with_capacity(ids),
            hasher: DefaultHashBuilder::default(),
        }
    }

    /// The ids, in the order they first came.
    pub fn ids(&self) -> &AccountIds {
        &self.ids
    }

    /// The place of `id`, if it is held.
    pub fn place(&self, id: &str) -> Option<u32> {
        let hash = self.hasher.hash_one(id);
        self.places.find(hash, |&p| self.ids.get(p) == id).copied()
    }

    /// The place of `id`: its own when it is held already, else the next;
    /// `None` when the list is full ([`AccountIds::push`]).
    pub fn insert(&mut self, id: &str) -> Option<u32> {
        let IdIndex {
            ids,
            places,
            hasher,
        } = self;
        // One hash finds the id or its room; growing the table hashes each
        // place's id again.
        let found = places.entry(
            hasher.hash_one(id),
            |&p| ids.get(p) == id,
            |&p| hasher.hash_one(ids.get(p)),
        );
        match found {
            Entry::Occupied(held) => Some(*held.get()),
            Entry::Vacant(room) => {
                let place = ids.push(id)?;
                room.insert(place);
                Some(place)
            }
        }
    }
}

impl fmt::Debug for IdIndex {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.debug_struct("IdIndex")
            .field("ids", &self.ids.len())
            .finish()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    proptest! {
        /// Held like an ordered set: each id once, at the place it first
        /// came, found by its exact text and by nothing else.
        #[test]
        fn ids_are_held_once_each_in_the_order_they_came(
            given in proptest::collection::vec("[a-cA-C0-9\u{e9}-]{0,6}", 0..200),
            asked in proptest::collection::vec("[a-cA-C0-9\u{e9}-]{0,6}", 0..50),
        ) {
            let mut ids = IdIndex::with_capacity(4); // grows past its room
            let mut order: Vec<String> = Vec::new();
            for id in &given {
                let expected = match order.iter().position(|o| o == id) {
                    Some(p) => p,
                    None => {
                        order.push(id.clone());
                        order.len() - 1
                    }
                };
                prop_assert_eq!(ids.insert(id), u32::try_from(expected).ok());
            }
            prop_assert_eq!(ids.ids().len(), order.len());
            prop_assert_eq!(
                ids.ids().iter().collect::<Vec<_>>(),
                order.iter().map(String::as_str).collect::<Vec<_>>()
            );
            for id in given.iter().chain(&asked) {
                let expected = order.iter().position(|o| o == id).and_then(|p| u32::try_from(p).ok());
                prop_assert_eq!(ids.place(id), expected);
            }
        }
    }

    #[test]
    fn an_empty_id_is_an_id_like_any_other() {
        let mut ids = IdIndex::default();
        assert_eq!(ids.place(""), None);
        assert_eq!(ids.insert("A"), Some(0));
        assert_eq!(ids.insert(""), Some(1));
        assert_eq!(ids.place(""), Some(1));
        assert_eq!(ids.ids().get(1), "");
        assert_eq!(ids.ids().iter().collect::<Vec<_>>(), ["A", ""]);
    }
}

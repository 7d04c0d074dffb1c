//! [`TermMap`]: the terms of a form, keyed by source (or input) index and
//! iterated in key order. Most forms hold a handful of terms (an input, a
//! constant, a product), so small maps are a sorted vector (one small
//! allocation); a map that grows past `SMALL` becomes a B-tree, so long
//! accumulations insert in `O(log n)`.

use std::collections::BTreeMap;

/// A map from term keys to terms, ordered by key.
#[derive(Clone, Debug)]
pub(crate) enum TermMap<V> {
    /// At most `SMALL` entries, sorted by key.
    Few(Vec<(usize, V)>),
    /// Any number of entries.
    Many(BTreeMap<usize, V>),
}

/// The most entries a vector-backed map holds.
const SMALL: usize = 24;

impl<V> Default for TermMap<V> {
    fn default() -> TermMap<V> {
        TermMap::Few(Vec::new())
    }
}

impl<V> TermMap<V> {
    pub(crate) fn len(&self) -> usize {
        match self {
            TermMap::Few(v) => v.len(),
            TermMap::Many(m) => m.len(),
        }
    }

    pub(crate) fn is_empty(&self) -> bool {
        self.len() == 0
    }

    pub(crate) fn remove(&mut self, k: &usize) -> Option<V> {
        match self {
            TermMap::Few(v) => v
                .binary_search_by_key(k, |e| e.0)
                .ok()
                .map(|i| v.remove(i).1),
            TermMap::Many(m) => m.remove(k),
        }
    }

    pub(crate) fn insert(&mut self, k: usize, val: V) {
        match self {
            TermMap::Few(v) => {
                match v.binary_search_by_key(&k, |e| e.0) {
                    Ok(i) => v[i].1 = val,
                    Err(i) => {
                        // Most forms hold one or two terms: no spare room
                        // for those (a vector's first growth reserves 4).
                        if v.len() < 4 {
                            v.reserve_exact(1);
                        }
                        v.insert(i, (k, val));
                    }
                }
                if v.len() > SMALL {
                    let m: BTreeMap<usize, V> = std::mem::take(v).into_iter().collect();
                    *self = TermMap::Many(m);
                }
            }
            TermMap::Many(m) => {
                m.insert(k, val);
            }
        }
    }

    /// The entries in key order.
    pub(crate) fn iter(&self) -> Iter<'_, V> {
        match self {
            TermMap::Few(v) => Iter::Few(v.iter()),
            TermMap::Many(m) => Iter::Many(m.iter()),
        }
    }

    /// The keys in order.
    pub(crate) fn keys(&self) -> impl Iterator<Item = &usize> + '_ {
        self.iter().map(|(k, _)| k)
    }

    /// Apply `f` to every value, in key order.
    pub(crate) fn for_each_mut(&mut self, mut f: impl FnMut(&mut V)) {
        match self {
            TermMap::Few(v) => v.iter_mut().for_each(|(_, x)| f(x)),
            TermMap::Many(m) => m.values_mut().for_each(f),
        }
    }

    /// The entries in key order, by value.
    pub(crate) fn into_sorted(self) -> IntoIter<V> {
        match self {
            TermMap::Few(v) => IntoIter::Few(v.into_iter()),
            TermMap::Many(m) => IntoIter::Many(m.into_iter()),
        }
    }

    /// A map of `entries`, which must be sorted by key without repeats.
    pub(crate) fn from_sorted(entries: Vec<(usize, V)>) -> TermMap<V> {
        debug_assert!(entries.windows(2).all(|w| w[0].0 < w[1].0));
        if entries.len() <= SMALL {
            TermMap::Few(entries)
        } else {
            TermMap::Many(entries.into_iter().collect())
        }
    }
}

/// The entries of a [`TermMap`] in key order.
pub(crate) enum Iter<'a, V> {
    Few(std::slice::Iter<'a, (usize, V)>),
    Many(std::collections::btree_map::Iter<'a, usize, V>),
}

impl<'a, V> Iterator for Iter<'a, V> {
    type Item = (&'a usize, &'a V);

    fn next(&mut self) -> Option<Self::Item> {
        match self {
            Iter::Few(i) => i.next().map(|(k, v)| (k, v)),
            Iter::Many(i) => i.next(),
        }
    }
}

/// The entries of a [`TermMap`] in key order, by value.
pub(crate) enum IntoIter<V> {
    Few(std::vec::IntoIter<(usize, V)>),
    Many(std::collections::btree_map::IntoIter<usize, V>),
}

impl<V> Iterator for IntoIter<V> {
    type Item = (usize, V);

    fn next(&mut self) -> Option<Self::Item> {
        match self {
            IntoIter::Few(i) => i.next(),
            IntoIter::Many(i) => i.next(),
        }
    }
}

impl<'a, V> IntoIterator for &'a TermMap<V> {
    type Item = (&'a usize, &'a V);
    type IntoIter = Iter<'a, V>;

    fn into_iter(self) -> Iter<'a, V> {
        self.iter()
    }
}

impl<V> IntoIterator for TermMap<V> {
    type Item = (usize, V);
    type IntoIter = IntoIter<V>;

    fn into_iter(self) -> IntoIter<V> {
        self.into_sorted()
    }
}

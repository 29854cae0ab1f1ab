//! A few recent answers of a pure function, kept by the exact bits of their inputs,
//! so that asking the same question again returns the same answer without solving.
//! Used per thread for the ortho–para solution's saturation questions, which a
//! flowsheet asks at a few pressures and compositions again and again.

use std::collections::VecDeque;

/// Up to `capacity` answers, the oldest dropped first.
#[derive(Debug)]
pub struct Recent<K, V> {
    capacity: usize,
    kept: VecDeque<(K, V)>,
}

impl<K: PartialEq, V: Clone> Recent<K, V> {
    /// An empty store for up to `capacity` answers.
    pub const fn new(capacity: usize) -> Self {
        Recent {
            capacity,
            kept: VecDeque::new(),
        }
    }

    /// The answer kept for `key`, if any.
    pub fn get(&self, key: &K) -> Option<V> {
        self.kept
            .iter()
            .find(|(k, _)| k == key)
            .map(|(_, v)| v.clone())
    }

    /// Keeps `value` as the answer for `key`, dropping the oldest when full.
    pub fn put(&mut self, key: K, value: V) {
        if self.kept.len() == self.capacity {
            self.kept.pop_front();
        }
        self.kept.push_back((key, value));
    }
}

/// The answer of `solve` for `key` from `store` (a thread's own), solved and kept
/// when it is not there. Errors are not kept.
pub fn remembered<K: PartialEq + Copy, V: Clone, E>(
    store: &'static std::thread::LocalKey<std::cell::RefCell<Recent<K, V>>>,
    key: K,
    solve: impl FnOnce() -> Result<V, E>,
) -> Result<V, E> {
    if let Some(value) = store.with(|s| s.borrow().get(&key)) {
        return Ok(value);
    }
    let value = solve()?;
    store.with(|s| s.borrow_mut().put(key, value.clone()));
    Ok(value)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn keeps_the_latest_answers_and_drops_the_oldest() {
        let mut recent = Recent::new(2);
        recent.put(1u64, "one");
        recent.put(2, "two");
        assert_eq!(recent.get(&1), Some("one"));
        recent.put(3, "three");
        assert_eq!(recent.get(&1), None);
        assert_eq!(recent.get(&2), Some("two"));
        assert_eq!(recent.get(&3), Some("three"));
    }
}

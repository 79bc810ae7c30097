//! [`Shared`]: a value many accounts hold alike (their life events, their
//! GL codes), kept once and copied only when one of them changes it.
//!
//! A book of a million accounts holds mostly the same few values in these
//! parts; sharing them keeps an account's terms small. Reading through a
//! `Shared` is reading the value; writing copies it first when another
//! holder shares it, so no holder ever sees another's change. This module
//! never decides what is shared: the reader does.

use std::fmt;
use std::ops::{Deref, DerefMut};
use std::sync::Arc;

/// A value held once for every holder of an equal value, copied on write.
///
/// ```
/// use ledgerate::engine::shared::Shared;
/// let a = Shared::new(vec![1, 2]);
/// let mut b = a.clone();
/// b.push(3);
/// assert_eq!((a.len(), b.len()), (2, 3));
/// assert!(a.same(&a.clone()) && !a.same(&b));
/// ```
#[derive(Clone, PartialEq, Eq, Hash)]
pub struct Shared<T>(Arc<T>);

impl<T> Shared<T> {
    /// A value of its own.
    pub fn new(value: T) -> Shared<T> {
        Shared(Arc::new(value))
    }

    /// Whether `self` and `other` are one held value (not only equal).
    pub fn same(&self, other: &Shared<T>) -> bool {
        Arc::ptr_eq(&self.0, &other.0)
    }
}

impl<T> From<T> for Shared<T> {
    fn from(value: T) -> Shared<T> {
        Shared::new(value)
    }
}

impl<T> Deref for Shared<T> {
    type Target = T;

    fn deref(&self) -> &T {
        &self.0
    }
}

impl<T: Clone> DerefMut for Shared<T> {
    /// The value to change: copied first when another holder shares it.
    fn deref_mut(&mut self) -> &mut T {
        Arc::make_mut(&mut self.0)
    }
}

impl<T: fmt::Debug> fmt::Debug for Shared<T> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        self.0.fmt(f)
    }
}

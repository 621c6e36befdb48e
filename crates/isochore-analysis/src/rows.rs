//! Row numbers as people see them. A data row is numbered 1, 2, … in file order within its
//! data set (isochore-data and project files count that way too); the fit crate and the
//! window's tables index points and rows from 0. [`RowNumber`] is the one place where the
//! two meet: every conversion between them goes through [`RowNumber::from_index`] and
//! [`RowNumber::index`].

use serde::Serialize;
use std::fmt;

/// A 1-based data row, as shown to people, written in JSON and accepted by `--exclude`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(transparent)]
pub struct RowNumber(usize);

impl RowNumber {
    /// The row with this 1-based number; `None` for 0, which names no row.
    pub fn new(one_based: usize) -> Option<RowNumber> {
        (one_based > 0).then_some(RowNumber(one_based))
    }

    /// The row at this 0-based index (index 0 is row 1).
    pub fn from_index(index: usize) -> RowNumber {
        RowNumber(index.saturating_add(1))
    }

    /// The 1-based number.
    pub fn get(self) -> usize {
        self.0
    }

    /// The 0-based index of the row.
    pub fn index(self) -> usize {
        self.0 - 1
    }
}

impl fmt::Display for RowNumber {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.0)
    }
}

#[cfg(test)]
mod tests {
    use super::RowNumber;

    #[test]
    fn people_count_from_one_and_indices_from_zero() {
        assert_eq!(RowNumber::new(0), None);
        let r = RowNumber::new(3).unwrap();
        assert_eq!((r.get(), r.index(), r.to_string()), (3, 2, "3".to_string()));
        assert_eq!(RowNumber::from_index(0).get(), 1);
        assert_eq!(RowNumber::from_index(r.index()), r);
        assert_eq!(serde_json::to_string(&r).unwrap(), "3");
    }
}

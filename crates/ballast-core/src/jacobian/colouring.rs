//! Column grouping for finite-difference Jacobians (Curtis, Powell and
//! Reid, IMA J. Appl. Math. 13 (1974) 117–119).
//!
//! Two columns that share no row can be perturbed together: one
//! right-hand-side call then gives both columns. A grouping is a colouring
//! of the column-intersection graph; each colour costs one call.

use crate::system::SparsityPattern;

/// Columns grouped so that no two columns of a group share a row.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ColumnGroups {
    /// `group_of[j]`: the group of column `j`.
    pub group_of: Vec<usize>,
    /// Columns of group `g`: `columns[start[g]..start[g + 1]]`.
    pub columns: Vec<usize>,
    /// Group offsets into `columns` (length `groups + 1`).
    pub start: Vec<usize>,
}

impl ColumnGroups {
    /// Number of groups (right-hand-side calls per Jacobian).
    pub fn len(&self) -> usize {
        self.start.len() - 1
    }

    /// Whether there are no groups (dimension 0).
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// The columns of group `g`.
    pub fn group(&self, g: usize) -> &[usize] {
        &self.columns[self.start[g]..self.start[g + 1]]
    }

    fn from_assignment(group_of: Vec<usize>) -> Self {
        let groups = group_of.iter().map(|g| g + 1).max().unwrap_or(0);
        let mut start = vec![0; groups + 1];
        for &g in &group_of {
            start[g + 1] += 1;
        }
        for g in 0..groups {
            start[g + 1] += start[g];
        }
        let mut fill = start.clone();
        let mut columns = vec![0; group_of.len()];
        for (j, &g) in group_of.iter().enumerate() {
            columns[fill[g]] = j;
            fill[g] += 1;
        }
        Self {
            group_of,
            columns,
            start,
        }
    }

    /// One column per group: `n` groups (the dense case).
    pub fn dense(n: usize) -> Self {
        Self::from_assignment((0..n).collect())
    }

    /// Banded: column `j` in group `j mod (lower + upper + 1)`. Columns
    /// `lower + upper + 1` apart never share a row, so `lower + upper + 1`
    /// calls suffice (Curtis, Powell and Reid 1974).
    pub fn banded(n: usize, lower: usize, upper: usize) -> Self {
        let w = lower + upper + 1;
        Self::from_assignment((0..n).map(|j| j % w).collect())
    }

    /// Greedy sequential colouring of the column-intersection graph of
    /// `pattern`, columns in natural order, each taking the smallest group
    /// with no conflicting column (Curtis, Powell and Reid 1974; the
    /// number of groups is at most the largest number of columns meeting
    /// any single column, plus one).
    pub fn greedy(pattern: &SparsityPattern) -> Self {
        let n = pattern.dim();
        // Row-wise lists of columns.
        let mut row_ptr = vec![0usize; n + 1];
        for &i in pattern.row_idx() {
            row_ptr[i + 1] += 1;
        }
        for i in 0..n {
            row_ptr[i + 1] += row_ptr[i];
        }
        let mut fill = row_ptr.clone();
        let mut row_cols = vec![0usize; pattern.nnz()];
        for j in 0..n {
            for &i in pattern.column(j) {
                row_cols[fill[i]] = j;
                fill[i] += 1;
            }
        }
        const NONE: usize = usize::MAX;
        let mut group_of = vec![NONE; n];
        // `mark[g] == j` when group g is taken by a neighbour of column j.
        let mut mark = vec![NONE; n.max(1)];
        for j in 0..n {
            for &i in pattern.column(j) {
                for &k in &row_cols[row_ptr[i]..row_ptr[i + 1]] {
                    if group_of[k] != NONE {
                        mark[group_of[k]] = j;
                    }
                }
            }
            group_of[j] = (0..).find(|&g| mark[g] != j).unwrap_or(0);
        }
        Self::from_assignment(group_of)
    }

    /// Whether no two columns of a group share a row of `pattern`.
    pub fn is_valid_for(&self, pattern: &SparsityPattern) -> bool {
        let n = pattern.dim();
        let mut owner = vec![usize::MAX; n];
        for g in 0..self.len() {
            for &j in self.group(g) {
                for &i in pattern.column(j) {
                    if owner[i] == g {
                        return false;
                    }
                    owner[i] = g;
                }
            }
        }
        true
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    fn band_pattern(n: usize, l: usize, u: usize) -> SparsityPattern {
        let e: Vec<(usize, usize)> = (0..n)
            .flat_map(|j| (j.saturating_sub(u)..(j + l + 1).min(n)).map(move |i| (i, j)))
            .collect();
        SparsityPattern::new(n, &e).unwrap()
    }

    #[test]
    fn banded_grouping_uses_bandwidth_plus_one_groups() {
        let (n, l, u) = (50, 2, 3);
        let g = ColumnGroups::banded(n, l, u);
        assert_eq!(g.len(), l + u + 1);
        assert!(g.is_valid_for(&band_pattern(n, l, u)));
        // The greedy colouring finds the same count on a band (the lower
        // bound: a full row of the band has l + u + 1 columns).
        assert_eq!(
            ColumnGroups::greedy(&band_pattern(n, l, u)).len(),
            l + u + 1
        );
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(32))]
        #[test]
        fn greedy_groups_never_share_a_row(
            n in 1usize..40,
            entries in prop::collection::vec((0usize..40, 0usize..40), 0..120),
        ) {
            let e: Vec<(usize, usize)> = entries.into_iter().map(|(i, j)| (i % n, j % n)).collect();
            let p = SparsityPattern::new(n, &e).unwrap();
            let g = ColumnGroups::greedy(&p);
            prop_assert!(g.is_valid_for(&p));
            prop_assert_eq!(g.columns.len(), n);
            // Never more groups than columns; at least the largest row count.
            prop_assert!(g.len() <= n);
        }
    }
}

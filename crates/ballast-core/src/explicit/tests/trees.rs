//! Rooted trees, their densities and the elementary weights of a tableau
//! (Butcher 2016, section 3; Hairer, Norsett and Wanner I, II.2).
//!
//! A method with weights `w` has order `p` when `sum_i w_i Phi_i(t) =
//! 1/gamma(t)` for every rooted tree `t` with at most `p` vertices, where
//! `Phi_i(leaf) = 1` and `Phi_i([t_1, ..., t_m]) = prod_k (A Phi(t_k))_i`.
//! A continuous extension `b_i(theta)` has order `p*` when `sum_i b_i(theta)
//! Phi_i(t) = theta^rho(t) / gamma(t)` for every tree with `rho(t) <= p*`.

/// A rooted tree, its children given as indices into the list it lives in.
#[derive(Debug)]
pub struct Tree {
    /// Number of vertices `rho(t)`.
    pub order: usize,
    /// Density `gamma(t) = rho(t) prod_k gamma(t_k)`.
    pub gamma: f64,
    /// Indices of the subtrees hanging from the root.
    pub children: Vec<usize>,
}

/// Every rooted tree with at most `max_order` vertices, sorted by order.
pub fn trees_up_to(max_order: usize) -> Vec<Tree> {
    let mut list = vec![Tree {
        order: 1,
        gamma: 1.0,
        children: Vec::new(),
    }];
    for order in 2..=max_order {
        let mut forests = Vec::new();
        let last = list.len() - 1;
        forests_of(&list, order - 1, last, &mut Vec::new(), &mut forests);
        for children in forests {
            let gamma = order as f64 * children.iter().map(|&c| list[c].gamma).product::<f64>();
            list.push(Tree {
                order,
                gamma,
                children,
            });
        }
    }
    list
}

/// Multisets of trees (indices `<= max_index`, non-increasing, so each
/// multiset appears once) whose orders add up to `remaining`.
fn forests_of(
    list: &[Tree],
    remaining: usize,
    max_index: usize,
    current: &mut Vec<usize>,
    out: &mut Vec<Vec<usize>>,
) {
    if remaining == 0 {
        out.push(current.clone());
        return;
    }
    for i in 0..=max_index {
        if list[i].order <= remaining {
            current.push(i);
            forests_of(list, remaining - list[i].order, i, current, out);
            current.pop();
        }
    }
}

/// The stage vectors `Phi(t)` of every tree for the strictly lower-triangular
/// `a` (row `i` has `i` entries).
pub fn stage_vectors(trees: &[Tree], a: &[&[f64]]) -> Vec<Vec<f64>> {
    let s = a.len();
    let mut phi: Vec<Vec<f64>> = Vec::with_capacity(trees.len());
    for t in trees {
        let mut v = vec![1.0; s];
        for &c in &t.children {
            for i in 0..s {
                let ac: f64 = a[i].iter().zip(&phi[c]).map(|(x, y)| x * y).sum();
                v[i] *= ac;
            }
        }
        phi.push(v);
    }
    phi
}

/// `sum_i w_i Phi_i` (weights shorter than the stage count are zero-padded).
pub fn elementary_weight(w: &[f64], phi: &[f64]) -> f64 {
    w.iter().zip(phi).map(|(x, y)| x * y).sum()
}

#[test]
fn tree_counts_match_the_published_sequence() {
    // Number of rooted trees with n vertices, n = 1..8: 1, 1, 2, 4, 9, 20,
    // 48, 115 (Hairer, Norsett and Wanner I, II.2, Table 2.1; Butcher 2016).
    let trees = trees_up_to(8);
    let counts: Vec<usize> = (1..=8)
        .map(|n| trees.iter().filter(|t| t.order == n).count())
        .collect();
    assert_eq!(counts, vec![1, 1, 2, 4, 9, 20, 48, 115]);
}

#[test]
fn densities_of_small_trees() {
    // gamma of the trees of order 3 and 4: {3, 6} and {4, 8, 12, 24}
    // (Hairer, Norsett and Wanner I, II.2, Table 2.2).
    let trees = trees_up_to(4);
    let mut g3: Vec<f64> = trees
        .iter()
        .filter(|t| t.order == 3)
        .map(|t| t.gamma)
        .collect();
    let mut g4: Vec<f64> = trees
        .iter()
        .filter(|t| t.order == 4)
        .map(|t| t.gamma)
        .collect();
    g3.sort_by(f64::total_cmp);
    g4.sort_by(f64::total_cmp);
    assert_eq!(g3, vec![3.0, 6.0]);
    assert_eq!(g4, vec![4.0, 8.0, 12.0, 24.0]);
}

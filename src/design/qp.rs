//! Small dense quadratic programs, solved by the Clarabel interior-point
//! solver: `min ½ xᵀ P x + qᵀ x` subject to `E x = e` and `G x ≤ g`.

use clarabel::algebra::CscMatrix;
use clarabel::solver::{DefaultSettings, DefaultSolver, IPSolver, SolverStatus, SupportedConeT};

/// Linear constraints on the design variables.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Constraints {
    /// Rows of `E` (equalities).
    pub eq_rows: Vec<Vec<f64>>,
    /// Right-hand sides `e`.
    pub eq_rhs: Vec<f64>,
    /// Rows of `G` (inequalities `G x ≤ g`).
    pub le_rows: Vec<Vec<f64>>,
    /// Right-hand sides `g`.
    pub le_rhs: Vec<f64>,
}

/// Why a quadratic program gave no answer.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum QpFailure {
    /// The constraints cannot all hold.
    Infeasible,
    /// The solver stopped without a solution.
    NoSolution,
}

fn dense_to_csc(rows: &[Vec<f64>], n: usize, upper_only: bool) -> CscMatrix<f64> {
    let m = rows.len();
    let mut colptr = Vec::with_capacity(n + 1);
    let mut rowval = Vec::new();
    let mut nzval = Vec::new();
    colptr.push(0);
    for c in 0..n {
        for (r, row) in rows.iter().enumerate() {
            if upper_only && r > c {
                break;
            }
            let v = row.get(c).copied().unwrap_or(0.0);
            if v != 0.0 {
                rowval.push(r);
                nzval.push(v);
            }
        }
        colptr.push(rowval.len());
    }
    CscMatrix::new(m, n, colptr, rowval, nzval)
}

/// Solves the program; `p` is the full symmetric matrix (rows), `n` variables.
///
/// # Errors
/// [`QpFailure`] when the constraints are infeasible or the solver stops
/// without an (almost) solved status.
pub fn solve(p: &[Vec<f64>], q: &[f64], c: &Constraints) -> Result<Vec<f64>, QpFailure> {
    let n = q.len();
    let p_csc = dense_to_csc(p, n, true);
    let mut a_rows: Vec<Vec<f64>> = c.eq_rows.clone();
    a_rows.extend(c.le_rows.iter().cloned());
    let mut b: Vec<f64> = c.eq_rhs.clone();
    b.extend(c.le_rhs.iter().copied());
    let a_csc = dense_to_csc(&a_rows, n, false);
    let mut cones = Vec::new();
    if !c.eq_rows.is_empty() {
        cones.push(SupportedConeT::ZeroConeT(c.eq_rows.len()));
    }
    if !c.le_rows.is_empty() {
        cones.push(SupportedConeT::NonnegativeConeT(c.le_rows.len()));
    }
    let settings = DefaultSettings {
        verbose: false,
        max_iter: 200,
        ..DefaultSettings::default()
    };
    let mut solver = DefaultSolver::new(&p_csc, q, &a_csc, &b, &cones, settings)
        .map_err(|_| QpFailure::NoSolution)?;
    solver.solve();
    match solver.solution.status {
        SolverStatus::Solved | SolverStatus::AlmostSolved => Ok(solver.solution.x.clone()),
        SolverStatus::PrimalInfeasible | SolverStatus::AlmostPrimalInfeasible => {
            Err(QpFailure::Infeasible)
        }
        _ => Err(QpFailure::NoSolution),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_box_constrained_least_squares_problem() {
        // Hand calculation, common practice: min (x−2)² + (y+1)² s.t. x + y = 0.5, x ≤ 1
        // → x = 1 (bound active), y = −0.5.
        let p = vec![vec![2.0, 0.0], vec![0.0, 2.0]];
        let q = vec![-4.0, 2.0];
        let c = Constraints {
            eq_rows: vec![vec![1.0, 1.0]],
            eq_rhs: vec![0.5],
            le_rows: vec![vec![1.0, 0.0]],
            le_rhs: vec![1.0],
        };
        let x = solve(&p, &q, &c).unwrap();
        assert!(
            (x[0] - 1.0).abs() < 1e-6 && (x[1] + 0.5).abs() < 1e-6,
            "{x:?}"
        );
        let bad = Constraints {
            le_rows: vec![vec![1.0, 0.0], vec![-1.0, 0.0]],
            le_rhs: vec![1.0, -2.0],
            ..Constraints::default()
        };
        assert_eq!(solve(&p, &q, &bad), Err(QpFailure::Infeasible));
    }
}

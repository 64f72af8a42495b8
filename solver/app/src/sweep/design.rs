//! Designs: which combinations of parameter values become variants.
//!
//! - a full grid: every combination, the first parameter varying slowest;
//! - one at a time: the base job first, then each parameter through its
//!   values with every other parameter at its base value (values equal to the
//!   base are not repeated);
//! - a Latin hypercube (McKay, Beckman & Conover 1979, "A comparison of three
//!   methods for selecting values of input variables in the analysis of
//!   output from a computer code", Technometrics 21:239–245): each
//!   parameter's probability range cut into `samples` strata of equal
//!   probability, one value drawn in each stratum, the strata of the
//!   parameters paired by independent random permutations. The generator is
//!   ChaCha8 seeded from the sweep file's `seed`, so a seed gives the same
//!   variants on every machine.

use rand::seq::SliceRandom;
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use statrs::distribution::{ContinuousCDF, Normal};

use super::keypath::ParamValue;

/// The values one parameter may take.
#[derive(Debug, Clone, PartialEq)]
pub enum Levels {
    /// Given values (from `values`, or `range` with `count`).
    List(Vec<ParamValue>),
    /// Uniform between the two bounds (`range` without `count` or `distribution.uniform`; Latin hypercube only).
    Uniform(f64, f64),
    /// Gaussian with mean and standard deviation (Latin hypercube only).
    Normal(f64, f64),
}

/// A design with its settings.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Design {
    /// Every combination of all levels.
    Grid,
    /// Each parameter through its levels in turn, the others at their base values.
    OneAtATime,
    /// A Latin hypercube sample.
    LatinHypercube {
        /// Number of variants (strata per parameter).
        samples: usize,
        /// Seed of the random generator; the same seed gives the same variants.
        seed: u64,
    },
}

/// One swept parameter, checked against the base job.
#[derive(Debug, Clone, PartialEq)]
pub struct Parameter {
    /// Its key path in the job.
    pub key: String,
    /// Its value in the base job.
    pub base: ParamValue,
    /// The values to try.
    pub levels: Levels,
}

/// The parameter values of every variant, one row per variant in the order of `parameters`.
pub fn rows(design: Design, parameters: &[Parameter]) -> Vec<Vec<ParamValue>> {
    match design {
        Design::Grid => grid(parameters),
        Design::OneAtATime => one_at_a_time(parameters),
        Design::LatinHypercube { samples, seed } => latin_hypercube(parameters, samples, seed),
    }
}

fn list(p: &Parameter) -> &[ParamValue] {
    match &p.levels {
        Levels::List(v) => v,
        _ => unreachable!("the plan gives grids and one-at-a-time studies lists only"),
    }
}

fn grid(parameters: &[Parameter]) -> Vec<Vec<ParamValue>> {
    let mut rows: Vec<Vec<ParamValue>> = vec![Vec::new()];
    for p in parameters {
        rows = rows.into_iter().flat_map(|row| list(p).iter().map(move |v| [row.clone(), vec![v.clone()]].concat())).collect();
    }
    rows
}

fn one_at_a_time(parameters: &[Parameter]) -> Vec<Vec<ParamValue>> {
    let base: Vec<ParamValue> = parameters.iter().map(|p| p.base.clone()).collect();
    let mut rows = vec![base.clone()];
    for (i, p) in parameters.iter().enumerate() {
        for v in list(p).iter().filter(|&v| *v != p.base) {
            let mut row = base.clone();
            row[i] = v.clone();
            rows.push(row);
        }
    }
    rows
}

fn latin_hypercube(parameters: &[Parameter], samples: usize, seed: u64) -> Vec<Vec<ParamValue>> {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let mut columns = Vec::new();
    for p in parameters {
        let mut strata: Vec<usize> = (0..samples).collect();
        strata.shuffle(&mut rng);
        let column: Vec<ParamValue> = strata
            .into_iter()
            .map(|s| {
                // A probability drawn inside stratum s; kept off 0 and 1 for the normal's tails.
                let u = ((s as f64 + rng.random::<f64>()) / samples as f64).clamp(1e-12, 1.0 - 1e-12);
                quantile(p, u)
            })
            .collect();
        columns.push(column);
    }
    (0..samples).map(|j| columns.iter().map(|c| c[j].clone()).collect()).collect()
}

/// The value at cumulative probability `u` of a parameter's levels, to six
/// significant digits; integer keys get the nearest integer.
fn quantile(p: &Parameter, u: f64) -> ParamValue {
    let x = match &p.levels {
        Levels::List(values) => return values[((u * values.len() as f64) as usize).min(values.len() - 1)].clone(),
        Levels::Uniform(lo, hi) => lo + u * (hi - lo),
        Levels::Normal(mean, sd) => Normal::new(*mean, *sd).expect("the plan checks sd > 0").inverse_cdf(u),
    };
    match p.base {
        ParamValue::Integer(_) => ParamValue::Integer(x.round() as i64),
        // Six significant digits: plenty for a design value, and readable in the job and the table.
        _ => ParamValue::Float(format!("{x:.5e}").parse().expect("a formatted float parses")),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn floats(key: &str, base: f64, values: &[f64]) -> Parameter {
        Parameter {
            key: key.into(),
            base: ParamValue::Float(base),
            levels: Levels::List(values.iter().map(|&v| ParamValue::Float(v)).collect()),
        }
    }

    #[test]
    fn grid_takes_every_combination_first_parameter_slowest() {
        let r = rows(Design::Grid, &[floats("a", 1.0, &[1.0, 2.0]), floats("b", 5.0, &[5.0, 6.0, 7.0])]);
        assert_eq!(r.len(), 6);
        assert_eq!(r[0], vec![ParamValue::Float(1.0), ParamValue::Float(5.0)]);
        assert_eq!(r[2], vec![ParamValue::Float(1.0), ParamValue::Float(7.0)]);
        assert_eq!(r[3], vec![ParamValue::Float(2.0), ParamValue::Float(5.0)]);
    }

    #[test]
    fn one_at_a_time_starts_at_the_base_and_skips_repeats() {
        let r = rows(Design::OneAtATime, &[floats("a", 1.0, &[0.5, 1.0, 2.0]), floats("b", 5.0, &[6.0])]);
        let f = |a, b| vec![ParamValue::Float(a), ParamValue::Float(b)];
        assert_eq!(r, vec![f(1.0, 5.0), f(0.5, 5.0), f(2.0, 5.0), f(1.0, 6.0)]);
    }

    #[test]
    fn latin_hypercube_fills_every_stratum_once_and_repeats_with_its_seed() {
        let n = 10;
        let p = [
            Parameter { key: "a".into(), base: ParamValue::Float(0.0), levels: Levels::Uniform(2.0, 3.0) },
            Parameter { key: "b".into(), base: ParamValue::Float(0.0), levels: Levels::Normal(0.0, 1.0) },
        ];
        let r = rows(Design::LatinHypercube { samples: n, seed: 7 }, &p);
        assert_eq!(r, rows(Design::LatinHypercube { samples: n, seed: 7 }, &p));
        assert_ne!(r, rows(Design::LatinHypercube { samples: n, seed: 8 }, &p));
        let mut strata: Vec<usize> = r.iter().map(|row| ((row[0].as_f64().unwrap() - 2.0) * n as f64) as usize).collect();
        strata.sort();
        assert_eq!(strata, (0..n).collect::<Vec<_>>());
        // Standard normal: the strata are cut at its deciles, e.g. ±1.2816 for the outer ones
        // (Abramowitz & Stegun 1964, table 26.1).
        let mut strata: Vec<usize> = r
            .iter()
            .map(|row| {
                let x = row[1].as_f64().unwrap();
                let cuts = [-1.2816, -0.8416, -0.5244, -0.2533, 0.0, 0.2533, 0.5244, 0.8416, 1.2816];
                cuts.iter().filter(|&&c| x > c).count()
            })
            .collect();
        strata.sort();
        assert_eq!(strata, (0..n).collect::<Vec<_>>());
    }
}

//! Parameters of batched runs: every parameter of a pair in one table, the
//! tables of the delete-one pools, and the jackknife standard errors they
//! give ([`crate::metrics::jackknife`]).

use super::parameters::{pair_parameters_with, PairParameters};
use crate::metrics::{jackknife_se, Parameter};
use crate::receiver::Echogram;
use crate::trace::{mean_echogram, TraceResult};

/// Values of every parameter of one pair: index `parameter · (bands + 1) + slot`,
/// slot `0..bands` a band, slot `bands` the single-number value.
#[derive(Clone, Debug, PartialEq)]
pub struct ValueTable {
    /// Bands.
    pub bands: usize,
    /// The values, `None` where undefined.
    pub values: Vec<Option<f64>>,
}

impl ValueTable {
    /// The table of one pair's parameters.
    #[must_use]
    pub fn of(parameters: &PairParameters) -> Self {
        let bands = parameters.bands.len();
        let mut values = Vec::with_capacity(Parameter::ALL.len() * (bands + 1));
        for p in Parameter::ALL {
            values.extend(parameters.bands.iter().map(|b| finite(p.of_band(b))));
            values.push(finite(p.of_averages(&parameters.averages)));
        }
        Self { bands, values }
    }

    /// Index of `parameter` in `slot` (a band index, or `bands` for the single number).
    #[must_use]
    pub fn index(&self, parameter: Parameter, slot: usize) -> usize {
        let p = Parameter::ALL
            .iter()
            .position(|&q| q == parameter)
            .unwrap_or(0);
        p * (self.bands + 1) + slot
    }

    /// The value of `parameter` in `slot`.
    #[must_use]
    pub fn get(&self, parameter: Parameter, slot: usize) -> Option<f64> {
        self.values
            .get(self.index(parameter, slot))
            .copied()
            .flatten()
    }

    /// The jackknife standard error of every entry from the tables of the
    /// delete-one pools (all of one layout); `None` where any is undefined.
    #[must_use]
    pub fn standard_errors(delete_one: &[ValueTable]) -> Option<Self> {
        let first = delete_one.first()?;
        let values = (0..first.values.len())
            .map(|i| {
                let column: Vec<Option<f64>> = delete_one
                    .iter()
                    .map(|t| t.values.get(i).copied().flatten())
                    .collect();
                jackknife_se(&column)
            })
            .collect();
        Some(Self {
            bands: first.bands,
            values,
        })
    }
}

fn finite(v: Option<f64>) -> Option<f64> {
    v.filter(|x| x.is_finite())
}

/// The value tables of pair `pair`'s delete-one pools over `batches` (the
/// batches of one run, in batch order): pool b is the mean of every batch
/// but b.
#[must_use]
pub fn delete_one_tables(batches: &[TraceResult], pair: usize) -> Vec<ValueTable> {
    let Some(first) = batches.first() else {
        return Vec::new();
    };
    let all: Vec<&Echogram> = batches
        .iter()
        .map(|r| &r.echograms[pair].echogram)
        .collect();
    (0..all.len())
        .map(|skip| {
            ValueTable::of(&pair_parameters_with(
                first,
                &first.echograms[pair],
                &mean_echogram(&all, Some(skip)),
            ))
        })
        .collect()
}

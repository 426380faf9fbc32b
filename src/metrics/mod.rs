//! ISO 3382-1 room parameters from energy-time histograms (simulated echograms)
//! and from measured impulse responses.
//!
//! Everything works on plain slices: energy per time bin, the bin width and the
//! direct-sound time. [`histogram_parameters`] serves the tracer's echograms,
//! [`analyse_impulse_response`] serves `polaray analyze`; both share the Schroeder
//! integration ([`schroeder`]), the decay fits ([`decay_fit`]) and the energy
//! ratios ([`energy_ratios`]).

pub mod averages;
pub mod decay_fit;
pub mod decay_plot;
pub mod energy_ratios;
pub mod filter_bank;
pub mod impulse_response;
pub mod jackknife;
pub mod jnd;
pub mod lateral;
pub mod noise_floor;
pub mod onset;
pub mod parameter;
pub mod parameters;
pub mod schroeder;
pub mod strength;
pub mod synthetic;
pub mod truncation;
pub mod wav;

pub use averages::{averages, Averages};
pub use decay_fit::{DecayFit, FitStatus};
pub use decay_plot::{write_decay_chart, DecayPanel};
pub use impulse_response::{analyse_impulse_response, MeasuredAnalysis, MeasuredBand};
pub use jackknife::jackknife_se;
pub use jnd::{jnd_of, Jnd, JND_TABLE};
pub use parameter::Parameter;
pub use parameters::{histogram_parameters, BandParameters, DecayFits, EchogramBand};
pub use schroeder::{DecayCurve, Tail};
pub use wav::{read_wav, ImpulseResponse, WavError};

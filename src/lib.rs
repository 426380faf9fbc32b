//! polaray: geometric room acoustics that compares scattering treatments.
//!
//! Data flow, one way only: room file → [`room`] → [`accel`] → [`trace`]
//! (calling a [`law::ReflectionLaw`] at each hit) → [`receiver`] echograms →
//! [`metrics`] → reports. [`polar`] and [`profile`] stand beside the chain
//! and feed the laws. The library never prints; the binary does.
#![warn(missing_docs)]

pub mod accel;
pub mod air;
pub mod bands;
pub mod build_info;
pub mod compare;
pub mod geometry;
pub mod gonio;
mod lanes;
pub mod law;
pub mod messages;
pub mod metrics;
pub mod output;
pub mod plot;
pub mod polar;
pub mod profile;
pub mod random;
pub mod receiver;
pub mod report;
pub mod room;
pub mod trace;

//! Rooms: the in-memory model ([`model`]), loading from room files and
//! geometric and acoustic checks.

pub mod model;

pub use model::{Material, Receiver, Room, Settings, Source, Surface, Triangle};

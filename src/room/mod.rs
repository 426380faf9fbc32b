//! Rooms: the in-memory model ([`model`]), loading from room files ([`load`])
//! and diffuse-field estimates ([`estimates`]).

pub mod estimates;
pub mod load;
pub mod model;

pub use load::{load_room, LoadedRoom, RoomError};
pub use model::{Material, Receiver, Room, Settings, Source, Surface, Triangle};

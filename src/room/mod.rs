//! Rooms: the in-memory model ([`model`]), loading from room files ([`load`],
//! schema in [`file`], meshes via [`obj`]), geometry checks ([`polygon`],
//! [`topology`], [`inside`], [`pairs`]) and diffuse-field estimates ([`estimates`]).

pub mod estimates;
pub mod file;
pub mod inside;
pub mod load;
pub mod model;
pub mod obj;
pub mod pairs;
pub mod polygon;
pub mod topology;

pub use load::{load_room, material_from_table, LoadedRoom, RoomError};
pub use model::{
    DiffusionGoniometer, Material, Receiver, Room, Settings, Source, Surface, Triangle,
};
